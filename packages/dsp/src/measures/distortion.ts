import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import { argMax, refinePeak } from '../spectrum/peak.js';
import { createWindow } from '../spectrum/windows.js';
import { nextPowerOfTwo, precondition, requirePositive } from '../util/preconditions.js';
import { aWeightingGain } from './a-weighting.js';
import { fitHarmonics, fitSineFourParameter, subtractHarmonics, type HarmonicComponent, type HarmonicFit } from './sine-fit.js';

/** Options of `measureDistortion`. */
export interface DistortionOptions {
  /** Highest harmonic counted (default 10; only those below Nyquist are used). */
  harmonics?: number;
  /** Measurement band for THD+N, SNR and the noise floor (default 20 Hz … min(20 kHz, fs/2)). */
  bandHz?: readonly [number, number];
  /** Start frequency for the sine fit; default: the interpolated peak of a Hann spectrum. */
  initialFrequencyHz?: number;
  /** Lowest frequency searched for the fundamental (default 10 Hz). */
  minFundamentalHz?: number;
  /**
   * Fraction of the AC power the fundamental must carry for the capture to count as a tone
   * (default 0.5); below it the tone measures are null.
   */
  minTonality?: number;
  /** A real FFT plan of size nextPowerOfTwo(x.length) to reuse. */
  plan?: RealFftPlan;
}

/** Tone-based measures of one channel. */
export interface DistortionResult {
  /** Null when no dominant tone was found (noise, multitone, silence). */
  tone: {
    fundamentalHz: number;
    /** Peak amplitude of the fitted fundamental (full scale = 1). */
    amplitude: number;
    /** Harmonics 2…K below Nyquist, from the joint least-squares fit. */
    harmonics: HarmonicComponent[];
    /** 100·√(Σ A_k², k = 2…K)/A_1. */
    thdPercent: number;
    /** 10·log10((noise + harmonics in band)/(total in band)), relative to the total signal (AES17). */
    thdnDb: number;
    thdnPercent: number;
    /** 10·log10(fundamental power / in-band noise), harmonics 2…K and DC excluded. */
    snrDb: number;
    /** 10·log10(fundamental power / (in-band noise + in-band harmonics)). */
    sinadDb: number;
    /** (SINAD − 1.76)/6.02, IEEE Std 1241. */
    enob: number;
  } | null;
  dc: number;
  bandHz: [number, number];
  /** In-band mean-square power of what remains after removing DC, the fundamental and its harmonics. */
  noisePower: number;
  /** 10·log10(2·noisePower): the in-band noise expressed in dBFS (AES17). */
  noiseFloorDbfs: number;
  /** The same, A-weighted (IEC 61672-1). */
  noiseFloorDbfsA: number;
  /** The residual (DC, fundamental and harmonics removed), full band, same length as the input. */
  residual: Float64Array;
}

/** Default measurement band, 20 Hz … min(20 kHz, fs/2). @see AES17-2020 §5.2.5 (standard low-pass filter) */
export function defaultBand(sampleRate: number): [number, number] {
  return [20, Math.min(20000, sampleRate / 2)];
}

/**
 * Interpolated frequency of the largest peak of a Hann-windowed spectrum above `minHz`.
 * @param magnitude one-sided |X[k]| of a Hann-windowed, zero-padded FFT
 * @throws RangeError when the spectrum has no bin above minHz
 * @see Jacobsen & Kootsookos 2007 (parabolic interpolation)
 */
export function estimatePeakFrequency(magnitude: Float64Array, binHz: number, minHz: number): number {
  const fn = 'estimatePeakFrequency';
  requirePositive(binHz, fn, 'binHz');
  const from = Math.max(1, Math.ceil(minHz / binHz));
  precondition(from < magnitude.length - 1, fn, `no bins above ${minHz} Hz`);
  const k = argMax(magnitude, from, magnitude.length - 1);
  return refinePeak(magnitude, k).bin * binHz;
}

/** One-sided |X| of a Hann-windowed record zero-padded to the plan size. */
function hannMagnitude(x: Float64Array, plan: RealFftPlan): Float64Array {
  const w = createWindow('hann', x.length, 'periodic');
  const buf = new Float64Array(plan.size);
  for (let i = 0; i < x.length; i++) buf[i] = (x[i] as number) * (w[i] as number);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buf, re, im);
  const mag = new Float64Array(plan.bins);
  for (let k = 0; k < plan.bins; k++) mag[k] = Math.hypot(re[k] as number, im[k] as number);
  return mag;
}

/** In-band mean-square power (plain and A-weighted) of a record from its zero-padded rectangular FFT. */
export function inBandPower(x: Float64Array, sampleRate: number, band: readonly [number, number], plan: RealFftPlan): { power: number; powerA: number } {
  const buf = new Float64Array(plan.size);
  buf.set(x);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buf, re, im);
  const binHz = sampleRate / plan.size;
  const k0 = Math.max(0, Math.ceil(band[0] / binHz - 1e-9));
  const k1 = Math.min(plan.bins - 1, Math.floor(band[1] / binHz + 1e-9));
  const last = plan.bins - 1;
  let p = 0;
  let pa = 0;
  for (let k = k0; k <= k1; k++) {
    const v = ((k === 0 || k === last ? 1 : 2) * ((re[k] as number) ** 2 + (im[k] as number) ** 2));
    const g = aWeightingGain(k * binHz);
    p += v;
    pa += v * g * g;
  }
  // Parseval with zero padding: mean square = Σ|X|²/(N_fft·L)
  const norm = 1 / (plan.size * x.length);
  return { power: p * norm, powerA: pa * norm };
}

/**
 * THD, THD+N, SNR, SINAD, ENOB and the noise floor of a (mostly) single-tone capture. The
 * fundamental's frequency comes from a four-parameter sine fit; DC, the fundamental and its
 * harmonics 2…K are then removed by a joint least-squares fit at k·f0, which works for tones
 * between bins where a window-only method leaks above a 16-bit noise floor. Noise is the
 * remaining power inside the band (by FFT of the residual); harmonic powers are A_k²/2.
 * @throws RangeError on a record shorter than 64 samples, a bad rate or band
 * @see IEEE Std 1241-2010 §4.1.4 (sine fits), §4.5 (THD), §4.6 (SINAD, ENOB);
 *   AES17-2020 §6.3 (THD+N relative to the total signal); W. Kester, Analog Devices MT-003
 *   (SNR excluding harmonics)
 */
export function measureDistortion(x: Float64Array, sampleRate: number, options: DistortionOptions = {}): DistortionResult {
  const fn = 'measureDistortion';
  precondition(x.length >= 64, fn, `record must hold at least 64 samples (got ${x.length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  const band = options.bandHz ? ([options.bandHz[0], Math.min(options.bandHz[1], sampleRate / 2)] as [number, number]) : defaultBand(sampleRate);
  precondition(band[0] >= 0 && band[1] > band[0], fn, `band must satisfy 0 ≤ low < high ≤ fs/2 (got ${band[0]}…${band[1]})`);
  const harmonics = options.harmonics ?? 10;
  const plan = options.plan ?? createRealFftPlan(nextPowerOfTwo(x.length));
  precondition(plan.size >= x.length, fn, `plan size ${plan.size} is shorter than the record`);

  let mean = 0;
  let meanSquare = 0;
  for (let i = 0; i < x.length; i++) {
    mean += x[i] as number;
    meanSquare += (x[i] as number) ** 2;
  }
  mean /= x.length;
  meanSquare /= x.length;
  const acPower = Math.max(0, meanSquare - mean * mean);

  let fit: HarmonicFit | null = null;
  if (acPower > 0) {
    const f0 = options.initialFrequencyHz ?? estimatePeakFrequency(hannMagnitude(x, plan), sampleRate / plan.size, options.minFundamentalHz ?? 10);
    if (f0 > 0 && f0 < sampleRate / 2) {
      try {
        let freq = fitSineFourParameter(x, sampleRate, f0).frequencyHz;
        fit = fitHarmonics(x, sampleRate, freq, harmonics);
        // Strong harmonics (THD above 0.1 %) bias a fundamental-only frequency fit slightly: refit on the record
        // without them, then refit the harmonics.
        const h1 = fit.components[0];
        const hPower = fit.components.slice(1).reduce((s, c) => s + c.amplitude ** 2, 0);
        if (h1 && hPower > 1e-6 * h1.amplitude ** 2) {
          const cleaned = subtractHarmonics(Float64Array.from(x), sampleRate, fit, (h) => h >= 2, false);
          freq = fitSineFourParameter(cleaned, sampleRate, freq).frequencyHz;
          fit = fitHarmonics(x, sampleRate, freq, harmonics);
        }
        const a1 = fit.components[0]?.amplitude ?? 0;
        if ((a1 * a1) / 2 < (options.minTonality ?? 0.5) * acPower) fit = null;
      } catch {
        // A record without a dominant tone can make the fit diverge: report no tone.
        fit = null;
      }
    }
  }

  const residual = Float64Array.from(x);
  if (fit) subtractHarmonics(residual, sampleRate, fit);
  else for (let i = 0; i < residual.length; i++) residual[i] = (residual[i] as number) - mean;
  const noise = inBandPower(residual, sampleRate, band, plan);
  const result: DistortionResult = {
    tone: null,
    dc: fit ? fit.dc : mean,
    bandHz: band,
    noisePower: noise.power,
    noiseFloorDbfs: 10 * Math.log10(2 * noise.power),
    noiseFloorDbfsA: 10 * Math.log10(2 * noise.powerA),
    residual,
  };
  if (!fit) return result;
  const [first, ...rest] = fit.components;
  if (!first) return result;
  const p1 = first.amplitude ** 2 / 2;
  const sumHarmonicSq = rest.reduce((s, c) => s + c.amplitude ** 2, 0);
  const inBand = (f: number): boolean => f >= band[0] && f <= band[1];
  const harmonicInBand = rest.filter((c) => inBand(c.frequencyHz)).reduce((s, c) => s + c.amplitude ** 2 / 2, 0);
  const fundamentalInBand = inBand(first.frequencyHz) ? p1 : 0;
  const distortion = noise.power + harmonicInBand;
  const total = distortion + fundamentalInBand;
  const sinadDb = 10 * Math.log10(p1 / distortion);
  result.tone = {
    fundamentalHz: fit.fundamentalHz,
    amplitude: first.amplitude,
    harmonics: rest,
    thdPercent: (100 * Math.sqrt(sumHarmonicSq)) / first.amplitude,
    thdnDb: 10 * Math.log10(distortion / total),
    thdnPercent: 100 * Math.sqrt(distortion / total),
    snrDb: 10 * Math.log10(p1 / noise.power),
    sinadDb,
    enob: (sinadDb - 1.76) / 6.02,
  };
  return result;
}
