import { createRealFftPlan } from '../fft/real-fft.js';
import { argMax, refinePeak } from '../spectrum/peak.js';
import { createWindow } from '../spectrum/windows.js';
import { nextPowerOfTwo, precondition, requirePositive } from '../util/preconditions.js';
import { createAudioBandPlan, resolveAudioBand, type AudioBandPlan } from './audio-band.js';
import { fitHarmonics, fitSineFourParameter, subtractHarmonics, type HarmonicFit } from './sine-fit.js';
import { captureSteadyWindow, stimulusSteadyWindow, type CaptureWindowOptions, type SteadyWindow } from './steady-window.js';
import { computeToneMeasures, dynamicRangeDb, inBandInclusive, type ToneMeasuresResult } from './tone-measures.js';

/** Options of `measureToneDistortion`. */
export interface ToneDistortionOptions {
  /** Measurement band (default 20 Hz … min(20 kHz, fs/2)). */
  bandHz?: readonly [number, number];
  /** Highest harmonic fitted (default 10; only those below Nyquist). */
  harmonics?: number;
  /** An explicit window [start, end) in samples; overrides the stimulus and the level search. */
  window?: readonly [number, number];
  /** The stimulus as played and the measured latency: the window then comes from its fades and onset. */
  stimulusWindow?: { stimulus: Float64Array; latencySamples: number; toleranceDb?: number; settleMs?: number; fadeSamples?: readonly [number, number] };
  /** Options of the level-based window search, used when neither `window` nor `stimulusWindow` is given. */
  steady?: CaptureWindowOptions;
  /** Frequencies searched for the fundamental (default 10 Hz … fs/2). */
  searchHz?: readonly [number, number];
  /** Start frequency for the sine fit; default: the interpolated peak of a Hann spectrum. */
  initialFrequencyHz?: number;
  /**
   * Share of the in-band signal the fundamental must carry to count as a tone (default 0.5,
   * i.e. SINAD ≥ 0 dB); below it the tone measures are null.
   */
  minTonality?: number;
  /**
   * A caller-owned cache of band plans (keyed by length, rate and band), filled on use: channels
   * of one capture usually share a window length, and a plan (Kaiser window, FFT tables) costs
   * about two FFTs to build.
   */
  bandPlans?: Map<string, AudioBandPlan>;
}

/** Tone measures of one channel with the window they were taken over. */
export interface ToneDistortionResult extends ToneMeasuresResult {
  /** The steady window used, in samples of the input. */
  window: SteadyWindow;
  /** DC of the window (from the fit, or the mean without a tone). */
  dc: number;
  /** AES17 dynamic range (see `dynamicRangeDb`); null unless the tone is near −60 dBFS. */
  dynamicRangeDb: number | null;
}

/** Longest segment used to find the start frequency (a fit on it then refines the estimate). */
const SEARCH_LENGTH = 65536;

/** One-sided |X| of a Hann-windowed centred segment (≤ SEARCH_LENGTH samples) zero-padded 2×. */
interface SegmentSpectrum {
  magnitude: Float64Array;
  binHz: number;
  /** Σw of the window: a sine of amplitude A peaks near A·Σw/2. */
  windowSum: number;
  segment: Float64Array;
}

function segmentSpectrum(x: Float64Array, sampleRate: number): SegmentSpectrum {
  const length = Math.min(x.length, SEARCH_LENGTH);
  const from = Math.floor((x.length - length) / 2);
  const segment = x.subarray(from, from + length);
  const plan = createRealFftPlan(2 * nextPowerOfTwo(length));
  const w = createWindow('hann', length, 'periodic');
  const buf = new Float64Array(plan.size);
  let windowSum = 0;
  for (let i = 0; i < length; i++) {
    buf[i] = (segment[i] as number) * (w[i] as number);
    windowSum += w[i] as number;
  }
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buf, re, im);
  const magnitude = new Float64Array(plan.bins);
  for (let k = 0; k < plan.bins; k++) magnitude[k] = Math.hypot(re[k] as number, im[k] as number);
  return { magnitude, binHz: sampleRate / plan.size, windowSum, segment };
}

/** Interpolated frequency and amplitude of the largest peak in [lo, hi] Hz; null when the span is empty. */
function strongestPeak(spectrum: SegmentSpectrum, lo: number, hi: number): { frequencyHz: number; amplitude: number } | null {
  const k0 = Math.max(1, Math.ceil(lo / spectrum.binHz));
  const k1 = Math.min(spectrum.magnitude.length - 1, Math.floor(hi / spectrum.binHz));
  if (k1 <= k0) return null;
  const peak = refinePeak(spectrum.magnitude, argMax(spectrum.magnitude, k0, k1));
  return { frequencyHz: peak.bin * spectrum.binHz, amplitude: (2 * peak.magnitude) / spectrum.windowSum };
}

/**
 * Start frequency: interpolated Hann peak of a centred segment, refined by a sine fit on that
 * segment; NaN when the segment holds no tone carrying at least `minShare` of its AC power, so a
 * sweep or noise costs one short fit instead of a full-record harmonic fit.
 */
function startFrequency(x: Float64Array, sampleRate: number, search: readonly [number, number], minShare: number): number {
  const spectrum = segmentSpectrum(x, sampleRate);
  const guess = strongestPeak(spectrum, search[0], search[1])?.frequencyHz ?? NaN;
  if (!(guess > 0 && guess < sampleRate / 2)) return NaN;
  if (spectrum.segment.length === x.length) return guess;
  const fit = fitSineFourParameter(spectrum.segment, sampleRate, guess);
  let mean = 0;
  let square = 0;
  for (const v of spectrum.segment) {
    mean += v;
    square += v * v;
  }
  mean /= spectrum.segment.length;
  const ac = square / spectrum.segment.length - mean * mean;
  return fit.amplitude ** 2 / 2 >= minShare * ac ? fit.frequencyHz : NaN;
}

/**
 * Strong ultrasonic tones (pilots, modulator carriers) found in the residual of a first tone
 * fit, removed from a copy of the record: a rectangular least-squares fit leaks a far tone into
 * every fitted harmonic at about A/(N·sin(Δω/2)) (the Dirichlet kernel), −135 dB for a −40 dBFS
 * pilot in 1 s at 96 kHz, which lands in the band when the model is subtracted. A peak counts
 * when it stands 40 dB above the median bin and above −150 dBFS; at most 4 are removed. The
 * residual is updated in place.
 * @returns the record without those tones, or null when there were none
 */
function removeUltrasonicTones(x: Float64Array, residual: Float64Array, sampleRate: number, bandHigh: number): Float64Array | null {
  const lo = bandHigh * 1.05;
  if (lo >= sampleRate / 2) return null;
  let cleaned: Float64Array | null = null;
  for (let removed = 0; removed < 4; removed++) {
    const spectrum = segmentSpectrum(residual, sampleRate);
    const peak = strongestPeak(spectrum, lo, sampleRate / 2 - 2 * spectrum.binHz);
    if (!peak || peak.amplitude < 10 ** (-150 / 20)) break;
    const sorted = Float64Array.from(spectrum.magnitude).sort();
    const median = (2 * (sorted[sorted.length >> 1] as number)) / spectrum.windowSum;
    if (peak.amplitude < 100 * median) break;
    const fit = fitHarmonics(residual, sampleRate, fitSineFourParameter(residual, sampleRate, peak.frequencyHz).frequencyHz, 1);
    subtractHarmonics(residual, sampleRate, fit);
    cleaned ??= Float64Array.from(x);
    subtractHarmonics(cleaned, sampleRate, fit, () => true, false);
  }
  return cleaned;
}

/** Four-parameter fit, joint harmonic fit, and a refit without strong harmonics (as distortion.ts does). */
function fitTone(x: Float64Array, sampleRate: number, f0: number, harmonics: number): HarmonicFit {
  let freq = fitSineFourParameter(x, sampleRate, f0).frequencyHz;
  let fit = fitHarmonics(x, sampleRate, freq, harmonics);
  const h1 = fit.components[0];
  const hPower = fit.components.slice(1).reduce((s, c) => s + c.amplitude ** 2, 0);
  // Strong harmonics (THD above 0.1 %) bias a fundamental-only frequency fit: refit without them.
  if (h1 && hPower > 1e-6 * h1.amplitude ** 2) {
    const cleaned = subtractHarmonics(Float64Array.from(x), sampleRate, fit, (h) => h >= 2, false);
    freq = fitSineFourParameter(cleaned, sampleRate, freq).frequencyHz;
    fit = fitHarmonics(x, sampleRate, freq, harmonics);
  }
  return fit;
}

/**
 * THD, THD+N, SNR, SINAD, ENOB, noise floor and dynamic range of a single-tone capture, over
 * its steady window: window (explicit, from the stimulus, or from the capture's in-band
 * level) → four-parameter sine fit and joint harmonic fit → residual → audio-band power
 * (Kaiser-windowed, exact band, A weighting on the noise only) → tone measures. A record
 * without a dominant tone (silence, DC, noise) returns null tone measures and a warning, never
 * a throw; so does a tone outside the band.
 * @throws RangeError on a record shorter than 64 samples, a bad rate, band or window
 * @see IEEE Std 1241-2010 §4.1.4 (sine fits), §4.5, §4.6; AES17-2020 §5.2.5 (band), §6.3
 *   (THD+N), §6.4.1 (dynamic range)
 */
export function measureToneDistortion(x: Float64Array, sampleRate: number, options: ToneDistortionOptions = {}): ToneDistortionResult {
  const fn = 'measureToneDistortion';
  precondition(x.length >= 64, fn, `record must hold at least 64 samples (got ${x.length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  const band = resolveAudioBand(sampleRate, options.bandHz);
  const harmonics = options.harmonics ?? 10;
  const minTonality = options.minTonality ?? 0.5;
  precondition(minTonality >= 0 && minTonality <= 1, fn, `minTonality must lie in [0, 1] (got ${minTonality})`);

  let window: SteadyWindow;
  if (options.window) {
    const [s, e] = options.window;
    precondition(Number.isInteger(s) && Number.isInteger(e) && s >= 0 && e <= x.length && e > s, fn, `window must be integers 0 ≤ start < end ≤ ${x.length} (got ${s}…${e})`);
    window = { start: s, end: e, trimmedLeadIn: s > 0, trimmedTail: e < x.length, reason: 'Window given by the caller.' };
  } else if (options.stimulusWindow) {
    const sw = options.stimulusWindow;
    window = stimulusSteadyWindow(sw.stimulus, x.length, sampleRate, { latencySamples: sw.latencySamples, toleranceDb: sw.toleranceDb, settleMs: sw.settleMs, fadeSamples: sw.fadeSamples });
  } else {
    window = captureSteadyWindow(x, sampleRate, { bandHighHz: band[1], ...options.steady });
  }
  const warnings: string[] = [];
  if (window.end - window.start < 64) {
    warnings.push(`The steady window (${window.end - window.start} samples) is too short to measure; the whole record is used.`);
    window = { start: 0, end: x.length, trimmedLeadIn: false, trimmedTail: false, reason: window.reason };
  }
  const seg = x.subarray(window.start, window.end);

  let mean = 0;
  let meanSquare = 0;
  for (let i = 0; i < seg.length; i++) {
    mean += seg[i] as number;
    meanSquare += (seg[i] as number) ** 2;
  }
  mean /= seg.length;
  meanSquare /= seg.length;
  const acPower = Math.max(0, meanSquare - mean * mean);

  let fit: HarmonicFit | null = null;
  let residual: Float64Array | null = null;
  // A record whose AC part is below a 64-bit float's resolution of its DC holds no tone.
  if (acPower > 1e-30 * Math.max(1, mean * mean)) {
    const search = options.searchHz ?? [10, sampleRate / 2];
    try {
      // Half the final tonality share: the segment pre-check only skips records that are clearly not a tone.
      const f0 = options.initialFrequencyHz ?? startFrequency(seg, sampleRate, search, minTonality / 2);
      if (f0 > 0 && f0 < sampleRate / 2) fit = fitTone(seg, sampleRate, f0, harmonics);
      if (fit) residual = subtractHarmonics(Float64Array.from(seg), sampleRate, fit);
      if (fit && residual && inBandInclusive(fit.fundamentalHz, band)) {
        const cleaned = removeUltrasonicTones(seg, residual, sampleRate, band[1]);
        if (cleaned) {
          fit = fitTone(cleaned, sampleRate, fit.fundamentalHz, harmonics);
          residual = subtractHarmonics(cleaned, sampleRate, fit);
        }
      }
    } catch {
      // A record without a dominant tone can make the fit diverge: report no tone.
      fit = null;
      residual = null;
    }
  }
  if (!fit || !residual) {
    residual = new Float64Array(seg.length);
    for (let i = 0; i < seg.length; i++) residual[i] = (seg[i] as number) - mean;
  }
  const key = `${seg.length}:${sampleRate}:${band[0]}:${band[1]}`;
  const plan = options.bandPlans?.get(key) ?? createAudioBandPlan(seg.length, sampleRate, { bandHz: band });
  options.bandPlans?.set(key, plan);
  const noise = plan.measure(residual);

  if (fit) {
    const first = fit.components[0];
    const p1 = first ? first.amplitude ** 2 / 2 : 0;
    let reference = acPower;
    if (first && inBandInclusive(first.frequencyHz, band)) {
      // In band: the tone must dominate the in-band signal (ultrasonic pilots do not count).
      const h = fit.components.slice(1).filter((c) => inBandInclusive(c.frequencyHz, band)).reduce((s, c) => s + c.amplitude ** 2 / 2, 0);
      reference = p1 + noise.power + h;
    }
    if (p1 < minTonality * reference) {
      fit = null;
      // Without a tone the residual is the record less its mean.
      const plainResidual = residual;
      for (let i = 0; i < seg.length; i++) plainResidual[i] = (seg[i] as number) - mean;
      const plain = plan.measure(plainResidual);
      noise.power = plain.power;
      noise.powerA = plain.powerA;
    }
  }

  const measures = computeToneMeasures(fit, noise, band);
  return {
    ...measures,
    warnings: [...warnings, ...measures.warnings],
    window,
    dc: fit ? fit.dc : mean,
    dynamicRangeDb: dynamicRangeDb(measures),
  };
}
