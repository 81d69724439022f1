import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import { nextPowerOfTwo, precondition, requirePositive } from '../util/preconditions.js';
import { aWeightingGain } from './a-weighting.js';
import { besselI0, kaiserMainLobeHalfWidth, kaiserTransform, kaiserWindow } from './kaiser-window.js';

/**
 * Kaiser β of the band-power window. β = 20 puts every sidelobe near −160 dB, so a −40 dBFS
 * ultrasonic pilot leaks below −190 dBFS into the band, far under a 24-bit floor.
 */
export const AUDIO_BAND_KAISER_BETA = 20;

/** Noise weighting: none, or IEC 61672-1 A weighting. */
export type NoiseWeighting = 'none' | 'a';

/** Mean-square power of a record inside the audio band, plain and A-weighted. */
export interface AudioBandPower {
  power: number;
  powerA: number;
}

/** Options of the audio-band measures. */
export interface AudioBandOptions {
  /** Measurement band [lo, hi] in Hz (default 20 Hz … min(20 kHz, fs/2)); hi is clipped to fs/2. */
  bandHz?: readonly [number, number];
}

/** A prepared band-power measurement for records of one length and rate. */
export interface AudioBandPlan {
  readonly length: number;
  readonly sampleRate: number;
  readonly bandHz: readonly [number, number];
  /** Main-lobe half-width of the window in Hz, √(β² + π²)·fs/(π·(N − 1)). */
  readonly mainLobeHalfWidthHz: number;
  /** The frequencies whose bins are summed: the band widened by the main-lobe half-width, within [0, fs/2]. */
  readonly summedHz: readonly [number, number];
  /**
   * Fraction of a white noise's full-band (0 … fs/2) power that `measure` reports, plain and
   * A-weighted: Σ c_k·g_k² over the summed bins divided by the FFT size.
   */
  readonly whiteNoiseFraction: AudioBandPower;
  /**
   * In-band mean-square power of x (length `length`), plain and A-weighted.
   * @throws RangeError when x has the wrong length
   */
  measure(x: Float64Array): AudioBandPower;
  /**
   * Power gain of the measurement for a sinusoid at `frequencyHz` (averaged over its phase):
   * measured power / true mean square. 1 in the pass band, the window's sidelobe level far outside.
   * @throws RangeError on a frequency outside [0, fs/2]
   */
  toneResponse(frequencyHz: number, weighting?: NoiseWeighting): number;
}

/**
 * The measurement band for a sample rate: [lo, min(hi, fs/2)], default 20 Hz … min(20 kHz, fs/2).
 * @throws RangeError on a bad rate or a band that is not 0 ≤ lo < hi
 * @see AES17-2020 §5.2.5 (standard 20 kHz low-pass filter)
 */
export function resolveAudioBand(sampleRate: number, bandHz?: readonly [number, number]): [number, number] {
  requirePositive(sampleRate, 'resolveAudioBand', 'sampleRate');
  const lo = bandHz ? bandHz[0] : 20;
  const hi = Math.min(bandHz ? bandHz[1] : 20000, sampleRate / 2);
  precondition(Number.isFinite(lo) && lo >= 0 && hi > lo, 'resolveAudioBand', `band must satisfy 0 ≤ low < high ≤ fs/2 (got ${lo}…${hi})`);
  return [lo, hi];
}

/**
 * Prepares the AES17-style audio-band power measurement for records of `length` samples:
 * the record is multiplied by a Kaiser window (β = 20), zero-padded to a power of two and
 * transformed once; the power is Σ c_k·|X_k|²/(N_fft·Σw²) over the bins from lo − h to hi + h,
 * h being the window's main-lobe half-width (c_k = 2, or 1 at DC and Nyquist). Widening the
 * band by h keeps a tone's whole main lobe inside up to exactly hi, so the pass band is flat
 * to hi; a tone beyond hi + 2h contributes only sidelobes (about −160 dB). This meets and
 * exceeds the standard low-pass filter of AES17 (±0.1 dB to 20 kHz, ≥ 60 dB from 24 kHz) as
 * long as 2h ≤ 4 kHz, i.e. N ≥ 2·6.44·fs/4000 (0.16 s… at 192 kHz, 620 samples).
 * NOTE: Σw² normalisation makes white noise read its true mean square in proportion to the
 * summed bandwidth; the extension adds 2h of noise bandwidth (0.03 dB for 0.1 s at any rate).
 * @param length record length N ≥ 64
 * @throws RangeError on a short record, a bad rate or band
 * @see AES17-2020 §5.2.5; F. J. Harris, Proc. IEEE 66(1), 1978 (window power normalisation,
 *   ENBW); Kaiser & Schafer 1980 (Kaiser window); IEC 61672-1:2013 annex E (A weighting)
 */
export function createAudioBandPlan(length: number, sampleRate: number, options: AudioBandOptions = {}): AudioBandPlan {
  const fn = 'createAudioBandPlan';
  precondition(Number.isInteger(length) && length >= 64, fn, `length must be an integer ≥ 64 (got ${length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  const band = resolveAudioBand(sampleRate, options.bandHz);
  const beta = AUDIO_BAND_KAISER_BETA;
  const i0Beta = besselI0(beta);
  const window = kaiserWindow(length, beta);
  let sumW2 = 0;
  for (let i = 0; i < length; i++) sumW2 += (window[i] as number) ** 2;
  const size = nextPowerOfTwo(length);
  const bins = size / 2 + 1;
  const binHz = sampleRate / size;
  const halfWidthHz = kaiserMainLobeHalfWidth(length, beta) * sampleRate;
  const summedLo = Math.max(0, band[0] - halfWidthHz);
  const summedHi = Math.min(sampleRate / 2, band[1] + halfWidthHz);
  const k0 = Math.max(0, Math.ceil(summedLo / binHz - 1e-9));
  const k1 = Math.min(bins - 1, Math.floor(summedHi / binHz + 1e-9));
  const last = bins - 1;
  // c_k and c_k·A(f_k)² per summed bin, built once per plan.
  const weight = new Float64Array(k1 - k0 + 1);
  const weightA = new Float64Array(k1 - k0 + 1);
  let fraction = 0;
  let fractionA = 0;
  for (let k = k0; k <= k1; k++) {
    const c = k === 0 || k === last ? 1 : 2;
    const g = aWeightingGain(k * binHz);
    weight[k - k0] = c;
    weightA[k - k0] = c * g * g;
    fraction += c;
    fractionA += c * g * g;
  }
  const norm = 1 / (size * sumW2);
  // NOTE: the FFT tables and buffers are built on the first `measure`, so a plan used only for
  // `toneResponse` (mask checks) costs one pass over the window.
  let work: { fft: RealFftPlan; buffer: Float64Array; re: Float64Array; im: Float64Array } | null = null;

  const measure = (x: Float64Array): AudioBandPower => {
    if (x.length !== length) precondition(false, 'AudioBandPlan.measure', `x must hold ${length} samples (got ${x.length})`);
    work ??= { fft: createRealFftPlan(size), buffer: new Float64Array(size), re: new Float64Array(bins), im: new Float64Array(bins) };
    const { fft, buffer, re, im } = work;
    // The tail of the buffer stays zero: only the first `length` samples are ever written.
    for (let i = 0; i < length; i++) buffer[i] = (x[i] as number) * (window[i] as number);
    fft.forward(buffer, re, im);
    let p = 0;
    let pa = 0;
    for (let k = k0; k <= k1; k++) {
      const v = (re[k] as number) ** 2 + (im[k] as number) ** 2;
      p += v * (weight[k - k0] as number);
      pa += v * (weightA[k - k0] as number);
    }
    return { power: p * norm, powerA: pa * norm };
  };

  // Bins farther than this from a tone hold only far sidelobes (below −200 dB each).
  const span = Math.ceil((halfWidthHz / binHz) * 4) + 256;
  const toneResponse = (frequencyHz: number, weighting: NoiseWeighting = 'none'): number => {
    precondition(frequencyHz >= 0 && frequencyHz <= sampleRate / 2, 'AudioBandPlan.toneResponse', `frequencyHz must lie in [0, fs/2] (got ${frequencyHz})`);
    const weights = weighting === 'a' ? weightA : weight;
    let sum = 0;
    // A real tone has lobes at +f and −f; bin k sees W(f_k − f) and W(f_k + f).
    for (const centre of [frequencyHz, -frequencyHz]) {
      const kc = Math.round(centre / binHz);
      const from = Math.max(k0, kc - span);
      const to = Math.min(k1, kc + span);
      for (let k = from; k <= to; k++) {
        const w = kaiserTransform((2 * Math.PI * (k * binHz - centre)) / sampleRate, length, beta, i0Beta);
        sum += (weights[k - k0] as number) * w * w;
      }
    }
    return sum / (2 * size * sumW2);
  };

  return {
    length,
    sampleRate,
    bandHz: band,
    mainLobeHalfWidthHz: halfWidthHz,
    summedHz: [k0 * binHz, k1 * binHz],
    whiteNoiseFraction: { power: fraction / size, powerA: fractionA / size },
    measure,
    toneResponse,
  };
}

/**
 * In-band mean-square power of a record (typically the residual after a sine fit), by the
 * method of `createAudioBandPlan`; for repeated records of one length, build the plan once.
 * @param weighting 'none' (default) or 'a' (IEC 61672-1 A weighting, applied to this record)
 * @throws RangeError on a record shorter than 64 samples, a bad rate or band
 * @see AES17-2020 §5.2.5; IEC 61672-1:2013 annex E
 */
export function audioBandPower(x: Float64Array, sampleRate: number, options: AudioBandOptions & { weighting?: NoiseWeighting } = {}): number {
  precondition(x.length >= 64, 'audioBandPower', `record must hold at least 64 samples (got ${x.length})`);
  const p = createAudioBandPlan(x.length, sampleRate, options).measure(x);
  return options.weighting === 'a' ? p.powerA : p.power;
}

/**
 * Power gain of the audio-band measurement for a sinusoid at `frequencyHz` in a record of
 * `length` samples (phase-averaged): 1 in the pass band, the Kaiser sidelobe level (about
 * −160 dB) beyond hi + 2h. Costs one pass to build the window; for many frequencies, build a
 * plan and call its `toneResponse`.
 * @throws RangeError on a short record, a bad rate, band or frequency
 * @see AES17-2020 §5.2.5 (the mask it is checked against); Kaiser & Schafer 1980
 */
export function audioBandToneResponse(frequencyHz: number, length: number, sampleRate: number, options: AudioBandOptions & { weighting?: NoiseWeighting } = {}): number {
  return createAudioBandPlan(length, sampleRate, options).toneResponse(frequencyHz, options.weighting);
}
