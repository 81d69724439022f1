import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import { spectralEnergy } from '../measures/levels.js';
import { refinePeak } from '../spectrum/peak.js';
import { exponentialSweep } from '../stimulus/sweep.js';
import { nextPowerOfTwo, precondition, requireFinite, requirePositive } from '../util/preconditions.js';
import { detectExponentialSweep, type SweepParameters } from './sweep-detect.js';
import type { TransferFunction } from './transfer-function.js';

/** Options of the sweep deconvolution. */
export interface SweepAnalysisOptions {
  /** Highest harmonic order whose impulse response is cut out (default 5; orders with k·f1 ≥ f2 are skipped). */
  maxOrder?: number;
  /**
   * Part of the linear window before the impulse-response peak, seconds (default 1; capped at
   * half the gap to the 2nd harmonic, T·ln 2/ln(f2/f1)/2, which sets the resolution at f1).
   */
  preSeconds?: number;
  /** Part of the linear window after the peak, seconds (default 0.5; capped by the room left before the wrapped harmonics). */
  postSeconds?: number;
  /** Tikhonov term ε of the spectral division as a fraction of max |X|² (default 1e-10). */
  regularization?: number;
  /** H is valid from f1·2^inset to f2·2^−inset (default 0: the whole swept range). */
  bandInsetOctaves?: number;
  /** Longest capture the deconvolver will take, samples (default: the reference's length). */
  captureLength?: number;
}

/** A reusable deconvolver for one sweep: the regularised, band-limited inverse spectrum 1/X. */
export interface SweepDeconvolver {
  readonly sampleRate: number;
  readonly sweep: SweepParameters;
  /** Length N of the deconvolution FFT; captures up to N samples are accepted. */
  readonly fftSize: number;
  /** |X|² of the reference per bin of the N-point FFT. */
  readonly referencePower: Float64Array;
  readonly inverseRe: Float64Array;
  readonly inverseIm: Float64Array;
  readonly plan: RealFftPlan;
  /** Smaller plans (H and harmonic spectra), built on first use and shared by every capture. */
  readonly plans: Map<number, RealFftPlan>;
  readonly maxOrder: number;
  readonly preSamples: number;
  readonly postSamples: number;
  readonly bandInsetOctaves: number;
}

/** One harmonic's impulse response, cut out of the deconvolved record. */
export interface HarmonicResponse {
  /** Harmonic order k ≥ 2. */
  order: number;
  /** Its time advance on the linear response, Δt_k = T·ln(k)/ln(f2/f1), seconds. */
  advanceSeconds: number;
  /** Lag (samples, relative to the reference) of `samples[0]`; negative lags lie before the reference start. */
  start: number;
  /** The windowed impulse response. */
  samples: Float64Array;
  /** Bin spacing of `magnitude`, Hz. */
  binHz: number;
  /** |H_k| at j·binHz, the k-th harmonic's amplitude relative to the input's for excitation at j·binHz/k; meaningful inside the valid band. */
  magnitude: Float64Array;
}

/** Result of deconvolving one capture of a sweep. */
export interface SweepAnalysis {
  sweep: SweepParameters;
  /** Lag of the linear impulse response's largest |sample|, whole samples. */
  latencySamples: number;
  /** The same with a parabolic sub-sample refinement, seconds. */
  latencySeconds: number;
  /**
   * H(f) of the windowed linear response, with the bulk delay `latencySamples` removed (as
   * `MaskContext.transfer` removes it); valid (and non-zero) only inside the swept range that
   * the capture covers. `referencePower` is |X|² of the sweep at each bin.
   */
  transfer: TransferFunction;
  /** The band where `transfer.valid` may be 1. */
  validBandHz: [number, number];
  /** The windowed linear impulse response; `start` is the lag of samples[0]. */
  linearIr: { start: number; samples: Float64Array };
  harmonics: HarmonicResponse[];
  /** (1/N)·Σ|Y_k|² of the capture's zero-padded rectangular FFT (equal to Σy² by Parseval). */
  captureEnergy: number;
  /** Length of the deconvolution FFT. */
  fftSize: number;
}

// The band weight B(f) = 1 on [f1/2, f2] falls to 0 by a raised cosine over [f1/4, f1/2] and over
// [f2, f2·2^(1/6)] (or Nyquist): far outside the sweep X is tiny, and 1/X there would turn capture
// noise (and DC) into an impulse response full of noise. The low edge stays an octave below f1 so
// that the linear window, whose spectrum smooths H over about 1/window, does not spread the
// edge of B into the valid band (measured on a wire, 10 s sweep from 20 Hz: 0.0065 dB at 20 Hz with
// the taper over [f1/2, f1], 0.0002 dB with it an octave lower).
const LOW_TAPER_FROM = 0.25;
const LOW_TAPER_TO = 0.5;
const HIGH_TAPER_RATIO = 2 ** (1 / 6);
// Pink-compensated stimulus power |X(f)|²·f below −20 dB of its in-band mean (faded ends) is not measured.
const EDGE_POWER_RATIO = 0.01;
// The smallest linear window after the peak that N must leave room for, and the room left
// before the wrapped harmonic responses (their own pre-ringing).
const MIN_POST_SECONDS = 0.1;
const WRAP_MARGIN_SECONDS = 0.05;
// The linear window's pre part P resolves H to about 1/P: bins nearer than 4/P to the low edge of
// B (f1/2) are not valid (measured on a wire with 1–4 s sweeps from 20 Hz: at most 0.04° and
// 0.004 dB of error there, falling to 0.002° at 8/P).
const EDGE_RESOLUTION_CYCLES = 4;
// Bins of H at least this many per f1 (32 → 0.6 Hz at f1 = 20 Hz) for phase fits at low frequency.
const BINS_PER_F1 = 32;

function sweepRate(sweep: SweepParameters): number {
  return Math.log(sweep.f2 / sweep.f1) / sweep.sweepSeconds;
}

function bandWeight(f: number, f1: number, f2: number, top: number): number {
  if (f >= f1 && f <= f2) return 1;
  if (f < f1) {
    const low = f1 * LOW_TAPER_FROM;
    const end = f1 * LOW_TAPER_TO;
    return f <= low ? 0 : f >= end ? 1 : 0.5 * (1 - Math.cos((Math.PI * (f - low)) / (end - low)));
  }
  if (f >= top) return 0;
  return 0.5 * (1 + Math.cos((Math.PI * (f - f2)) / (top - f2)));
}

/**
 * The reference samples of a sweep known only by its parameters: `startSample` zeros, then
 * A·sin(…) of Farina's formula (no fades), then zeros up to `length`.
 * @throws RangeError on parameters `exponentialSweep` rejects or a length shorter than the sweep
 * @see A. Farina, AES 108th Convention, 2000, preprint 5093, eq. (2)
 */
export function sweepFromParameters(sweep: SweepParameters, sampleRate: number, length?: number): Float64Array {
  const fn = 'sweepFromParameters';
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(Number.isInteger(sweep.startSample) && sweep.startSample >= 0, fn, `startSample must be a whole number ≥ 0 (got ${sweep.startSample})`);
  const body = exponentialSweep(sampleRate, sweep.f1, sweep.f2, sweep.sweepSeconds, sweep.amplitude);
  const total = length ?? sweep.startSample + body.length;
  precondition(Number.isInteger(total) && total >= sweep.startSample + body.length, fn, `length must hold the sweep (${sweep.startSample + body.length} samples, got ${total})`);
  const out = new Float64Array(total);
  out.set(body, sweep.startSample);
  return out;
}

/**
 * Prepares the deconvolution of captures of one sweep: G(f) = B(f)·X*(f)/(|X(f)|² + ε) from the
 * reference's N-point FFT, where B limits the result to the swept range. Build it once and
 * apply it to every channel. N is the next power of two holding the reference, the longest
 * capture, and the sweep's harmonic span plus the linear window (so that the harmonics, which
 * land before the linear response, wrap round without reaching it).
 * @throws RangeError on a bad sample rate, a non-finite or too short reference, sweep
 *   parameters outside 0 < f1 < f2 ≤ fs/2, or bad options
 * @see S. Müller, P. Massarani, "Transfer-function measurement with sweeps", JAES 49(6), 2001
 *   (deconvolution by spectral division, band limitation; from memory); A. Farina, AES 108th
 *   Convention, 2000, preprint 5093; A. N. Tikhonov regularisation of the division
 */
export function prepareSweepDeconvolution(reference: Float64Array, sampleRate: number, sweep: SweepParameters, options: SweepAnalysisOptions = {}): SweepDeconvolver {
  const fn = 'prepareSweepDeconvolution';
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(reference.length >= 16, fn, `reference must hold at least 16 samples (got ${reference.length})`);
  requireFinite(reference, fn, 'reference');
  precondition(sweep.f1 > 0 && sweep.f1 < sweep.f2 && sweep.f2 <= sampleRate / 2, fn, `need 0 < f1 < f2 ≤ fs/2 (got ${sweep.f1}, ${sweep.f2} Hz at ${sampleRate} Hz)`);
  requirePositive(sweep.sweepSeconds, fn, 'sweepSeconds');
  const maxOrder = options.maxOrder ?? 5;
  precondition(Number.isInteger(maxOrder) && maxOrder >= 1, fn, `maxOrder must be a whole number ≥ 1 (got ${maxOrder})`);
  const regularization = options.regularization ?? 1e-10;
  precondition(regularization >= 0, fn, `regularization must be ≥ 0 (got ${regularization})`);
  const bandInsetOctaves = options.bandInsetOctaves ?? 0;
  precondition(bandInsetOctaves >= 0, fn, `bandInsetOctaves must be ≥ 0 (got ${bandInsetOctaves})`);
  const captureLength = options.captureLength ?? reference.length;
  precondition(Number.isInteger(captureLength) && captureLength >= 1, fn, `captureLength must be a whole number ≥ 1 (got ${captureLength})`);
  const preSeconds = options.preSeconds ?? 1;
  const postSeconds = options.postSeconds ?? 0.5;
  requirePositive(preSeconds, fn, 'preSeconds');
  requirePositive(postSeconds, fn, 'postSeconds');

  const rate = sweepRate(sweep);
  const nyquist = sampleRate / 2;
  const top = Math.min(sweep.f2 * HIGH_TAPER_RATIO, nyquist);
  // Second harmonic's advance: the linear window's pre part takes at most half of it.
  const preSamples = Math.max(1, Math.floor(Math.min(preSeconds, (0.5 * Math.log(2)) / rate) * sampleRate));
  // Harmonic content reaches back to the order whose image of f1 is the top of B.
  const span = Math.ceil((Math.log(top / sweep.f1) / rate) * sampleRate);
  const minPost = Math.round(Math.min(postSeconds, MIN_POST_SECONDS) * sampleRate);
  const margin = Math.min(preSamples, Math.round(WRAP_MARGIN_SECONDS * sampleRate));
  const sweepEnd = Math.min(reference.length, sweep.startSample + Math.ceil(sweep.sweepSeconds * sampleRate));
  const size = Math.max(4, nextPowerOfTwo(Math.max(sweepEnd, captureLength, span + margin + minPost)));
  const postSamples = Math.max(1, Math.min(Math.round(postSeconds * sampleRate), size - span - margin));

  const plan = createRealFftPlan(size);
  // A reference longer than N (trailing silence) is folded modulo N: its N-point DFT is unchanged.
  const buffer = new Float64Array(size);
  for (let i = 0; i < reference.length; i++) buffer[i % size] = (buffer[i % size] as number) + (reference[i] as number);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buffer, re, im);
  const referencePower = new Float64Array(plan.bins);
  let max = 0;
  for (let k = 0; k < plan.bins; k++) {
    const p = (re[k] as number) ** 2 + (im[k] as number) ** 2;
    referencePower[k] = p;
    if (p > max) max = p;
  }
  precondition(max > 0, fn, 'reference is silent');
  const eps = regularization * max;
  const binHz = sampleRate / size;
  for (let k = 0; k < plan.bins; k++) {
    const w = bandWeight(k * binHz, sweep.f1, sweep.f2, top);
    const d = (referencePower[k] as number) + eps;
    // B·X*/(|X|² + ε)
    re[k] = w > 0 && d > 0 ? (w * (re[k] as number)) / d : 0;
    im[k] = w > 0 && d > 0 ? (-w * (im[k] as number)) / d : 0;
  }
  return { sampleRate, sweep, fftSize: size, referencePower, inverseRe: re, inverseIm: im, plan, plans: new Map([[size, plan]]), maxOrder, preSamples, postSamples, bandInsetOctaves };
}

function planOf(deconvolver: SweepDeconvolver, size: number): RealFftPlan {
  let plan = deconvolver.plans.get(size);
  if (!plan) {
    plan = createRealFftPlan(size);
    deconvolver.plans.set(size, plan);
  }
  return plan;
}

/** Window rising by a half-Hann over the first `rise` samples and falling over the last `fall` samples. */
function taperedWindow(length: number, rise: number, fall: number): Float64Array {
  const w = new Float64Array(length).fill(1);
  for (let i = 0; i < rise; i++) w[i] = 0.5 * (1 - Math.cos((Math.PI * (i + 0.5)) / rise));
  for (let i = 0; i < fall; i++) w[length - 1 - i] = 0.5 * (1 - Math.cos((Math.PI * (i + 0.5)) / fall));
  return w;
}

/** Samples lag … lag + length − 1 of the circular record `ir`, times a taper. */
const scratches = new WeakMap<SweepDeconvolver, { buffer: Float64Array; yr: Float64Array; yi: Float64Array }>();

function scratchOf(d: SweepDeconvolver): { buffer: Float64Array; yr: Float64Array; yi: Float64Array } {
  let s = scratches.get(d);
  if (!s) {
    s = { buffer: new Float64Array(d.fftSize), yr: new Float64Array(d.plan.bins), yi: new Float64Array(d.plan.bins) };
    scratches.set(d, s);
  }
  return s;
}

function cutWindow(ir: Float64Array, lag: number, before: number, after: number): Float64Array {
  const n = ir.length;
  const length = before + after + 1;
  const w = taperedWindow(length, Math.ceil(before / 2), Math.ceil(after / 2));
  const out = new Float64Array(length);
  const first = lag - before;
  for (let i = 0; i < length; i++) out[i] = (ir[(((first + i) % n) + n) % n] as number) * (w[i] as number);
  return out;
}

/** FFT of a windowed response whose sample `origin` is placed at time 0 (earlier samples wrap to the end). */
function spectrumOf(samples: Float64Array, origin: number, plan: RealFftPlan, buffer: Float64Array, re: Float64Array, im: Float64Array): void {
  buffer.fill(0);
  const n = buffer.length;
  for (let i = 0; i < samples.length; i++) buffer[(((i - origin) % n) + n) % n] = samples[i] as number;
  plan.forward(buffer, re, im);
}

/**
 * Deconvolves one capture of the sweep and separates the linear impulse response from the
 * harmonic ones. h = IFFT(Y·G) is the full response: the linear part at the system's latency d,
 * the k-th harmonic's response Δt_k = T·ln(k)/ln(f2/f1) earlier (Farina 2000), wrapped round the
 * N-point record. The linear window runs from `pre` before the peak of |h| to `post` after it
 * (half-Hann tapers over the outer halves); the k-th window spans half the gap to each
 * neighbouring order (at most `pre`/`post`). H = FFT of the windowed linear response, zero-padded
 * to hold at least 32 bins per f1, and valid only where the sweep had energy: [f1, f2] (less
 * the inset), minus faded ends (|X|²·f below −20 dB of its in-band mean) and minus frequencies
 * the sweep reached only after the capture ended. Harmonic magnitudes |H_k| come from FFTs of
 * each harmonic window: |H_k(k·f)| is the k-th harmonic's amplitude relative to the input's for excitation at f,
 * because an exponential sweep's k-th harmonic sweeps k·f at the same rate (Hz/s per Hz) as the
 * fundamental passing k·f.
 * @throws RangeError when the capture is longer than the deconvolver's N, empty or not finite
 * @see A. Farina, "Simultaneous measurement of impulse response and distortion with a swept-sine
 *   technique", AES 108th Convention, 2000, preprint 5093 (harmonic responses at Δt_k before the
 *   linear one); S. Müller, P. Massarani, JAES 49(6), 2001 (windowing the responses; from memory)
 */
export function analyzeSweepCapture(deconvolver: SweepDeconvolver, capture: Float64Array): SweepAnalysis {
  const fn = 'analyzeSweepCapture';
  const { plan, sampleRate, sweep, preSamples, postSamples } = deconvolver;
  const size = deconvolver.fftSize;
  precondition(capture.length >= 1, fn, 'capture is empty');
  precondition(capture.length <= size, fn, `capture holds ${capture.length} samples, more than the deconvolver's FFT (${size}); prepare it with captureLength ≥ ${capture.length}`);
  requireFinite(capture, fn, 'capture');

  // The deconvolver's own scratch, reused channel after channel (a 2²¹-point buffer costs more to
  // allocate and first touch than to transform); nothing returned refers to it.
  const scratch = scratchOf(deconvolver);
  const { buffer, yr, yi } = scratch;
  buffer.fill(0);
  buffer.set(capture);
  plan.forward(buffer, yr, yi);
  // The capture's zero-padded rectangular spectrum is at hand: its energy is the frequency side
  // of the Parseval check (Σ|Y_k|²/N = Σy²), so the report needs no FFT of its own for it.
  const captureEnergy = spectralEnergy(yr, yi, size);
  for (let k = 0; k < plan.bins; k++) {
    const ar = yr[k] as number;
    const ai = yi[k] as number;
    const gr = deconvolver.inverseRe[k] as number;
    const gi = deconvolver.inverseIm[k] as number;
    yr[k] = ar * gr - ai * gi;
    yi[k] = ar * gi + ai * gr;
  }
  const ir = buffer;
  plan.inverse(yr, yi, ir);

  // Latency: the largest |h| at a causal lag. What the nonlinearity makes — the harmonic
  // responses at −T·ln k/ln(f2/f1), k ≤ maxOrder, and under clipping the higher orders' pile-up
  // just behind them — lands at negative times (the buffer's end) and can outgrow the linear
  // peak, so the last 1.2·advance(maxOrder) of the buffer is not searched.
  const rate = sweepRate(sweep);
  const advance = (k: number): number => (Math.log(k) / rate) * sampleRate;
  const searchEnd = Math.max(1, Math.min(capture.length, size - Math.ceil(1.2 * advance(Math.max(2, deconvolver.maxOrder)))));
  let d = 0;
  let best = -1;
  for (let i = 0; i < searchEnd; i++) {
    const v = Math.abs(ir[i] as number);
    if (v > best) {
      best = v;
      d = i;
    }
  }
  const around = Float64Array.of(Math.abs(ir[(d - 1 + size) % size] as number), best, Math.abs(ir[(d + 1) % size] as number));
  const fractional = around[0] as number > 0 && around[2] as number > 0 ? refinePeak(around, 1).bin - 1 : 0;

  const linear = cutWindow(ir, d, preSamples, postSamples);

  // H on a grid of hSize bins: enough to hold the window and BINS_PER_F1 bins per f1.
  const hSize = Math.min(size, Math.max(nextPowerOfTwo(linear.length), nextPowerOfTwo(Math.ceil((BINS_PER_F1 * sampleRate) / sweep.f1))));
  const hPlan = planOf(deconvolver, hSize);
  const hBuffer = new Float64Array(hSize);
  const re = new Float64Array(hPlan.bins);
  const im = new Float64Array(hPlan.bins);
  spectrumOf(linear, preSamples, hPlan, hBuffer, re, im);
  const binHz = sampleRate / hSize;
  const stride = size / hSize;

  // Valid band: the swept range, less the inset and the part the capture missed.
  const inset = 2 ** deconvolver.bandInsetOctaves;
  let lo = Math.max(sweep.f1 * inset, sweep.f1 * LOW_TAPER_TO + (EDGE_RESOLUTION_CYCLES * sampleRate) / preSamples);
  let hi = sweep.f2 / inset;
  const coveredSeconds = (capture.length - d - sweep.startSample) / sampleRate;
  if (coveredSeconds < sweep.sweepSeconds) hi = Math.min(hi, sweep.f1 * Math.exp(rate * Math.max(0, coveredSeconds)) * 2 ** (-1 / 6));
  const referencePower = new Float64Array(hPlan.bins);
  let mean = 0;
  let count = 0;
  for (let j = 0; j < hPlan.bins; j++) {
    referencePower[j] = deconvolver.referencePower[j * stride] as number;
    const f = j * binHz;
    if (f >= sweep.f1 && f <= sweep.f2) {
      mean += (referencePower[j] as number) * f;
      count++;
    }
  }
  mean = count > 0 ? mean / count : 0;
  const valid = new Uint8Array(hPlan.bins);
  for (let j = 1; j < hPlan.bins; j++) {
    const f = j * binHz;
    if (f >= lo && f <= hi && (referencePower[j] as number) * f >= EDGE_POWER_RATIO * mean) valid[j] = 1;
    else {
      re[j] = 0;
      im[j] = 0;
    }
  }
  if (!(hi > lo)) {
    lo = sweep.f1;
    hi = sweep.f1;
  }

  const harmonics: HarmonicResponse[] = [];
  for (let k = 2; k <= deconvolver.maxOrder && k * sweep.f1 < sweep.f2; k++) {
    const lag = Math.round(d - advance(k));
    const before = Math.max(1, Math.floor(Math.min(preSamples, 0.5 * (advance(k + 1) - advance(k)))));
    const after = Math.max(1, Math.floor(Math.min(postSamples, 0.5 * (advance(k) - advance(k - 1)))));
    const samples = cutWindow(ir, lag, before, after);
    // NOTE: each harmonic gets its own FFT just long enough for its window: band means need no finer grid.
    const kPlan = planOf(deconvolver, Math.max(4, nextPowerOfTwo(samples.length)));
    const kr = new Float64Array(kPlan.bins);
    const ki = new Float64Array(kPlan.bins);
    spectrumOf(samples, before, kPlan, new Float64Array(kPlan.size), kr, ki);
    const magnitude = new Float64Array(kPlan.bins);
    for (let j = 0; j < kPlan.bins; j++) magnitude[j] = Math.sqrt((kr[j] as number) ** 2 + (ki[j] as number) ** 2);
    harmonics.push({ order: k, advanceSeconds: advance(k) / sampleRate, start: lag - before, samples, binHz: sampleRate / kPlan.size, magnitude });
  }

  return {
    sweep,
    latencySamples: d,
    latencySeconds: (d + fractional) / sampleRate,
    transfer: { method: 'deconvolution', binHz, re, im, referencePower, valid },
    validBandHz: [lo, hi],
    linearIr: { start: d - preSamples, samples: linear },
    harmonics,
    fftSize: size,
    captureEnergy,
  };
}

/**
 * One-call sweep analysis: detects the sweep in the reference when its parameters are not
 * given, prepares the deconvolver for this capture's length and analyses the capture (for
 * several channels, prepare once with `prepareSweepDeconvolution` instead).
 * @throws RangeError when no exponential sweep is found in the reference, and as
 *   `prepareSweepDeconvolution` and `analyzeSweepCapture` do
 * @see A. Farina, AES 108th Convention, 2000, preprint 5093
 */
export function analyzeSweep(reference: Float64Array, capture: Float64Array, sampleRate: number, options: SweepAnalysisOptions & { sweep?: SweepParameters } = {}): SweepAnalysis {
  const fn = 'analyzeSweep';
  requirePositive(sampleRate, fn, 'sampleRate');
  const sweep = options.sweep ?? detectExponentialSweep(reference, sampleRate);
  precondition(sweep !== null, fn, 'the reference is not an exponential sine sweep; measure it by H1 instead');
  const deconvolver = prepareSweepDeconvolution(reference, sampleRate, sweep, { ...options, captureLength: Math.max(options.captureLength ?? 0, capture.length) });
  return analyzeSweepCapture(deconvolver, capture);
}
