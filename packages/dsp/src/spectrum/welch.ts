import { createRealFftPlan } from '../fft/real-fft.js';
import { isPowerOfTwo, precondition, requirePositive } from '../util/preconditions.js';
import { createWindow, type WindowKind } from './windows.js';

/** Options of Welch's averaged periodogram (defaults follow scipy.signal.welch). */
export interface WelchOptions {
  /** Segment length, a power of two (default 256, or the signal length if shorter). */
  segmentLength?: number;
  /** Overlap in samples (default segmentLength/2). */
  overlap?: number;
  /** Window shape, periodic (default `hann`). */
  window?: WindowKind;
  /** Remove each segment's mean (`constant`, default) or not (`none`). */
  detrend?: 'constant' | 'none';
  /** `density` (units²/Hz, default) or `spectrum` (units², a sine of amplitude A reads A²/2). */
  scaling?: 'density' | 'spectrum';
}

/** One-sided averaged spectrum. */
export interface WelchResult {
  binHz: number;
  segmentLength: number;
  segments: number;
  /** Auto spectrum (Pxx) or, from `welchCrossSpectrum`, the real part of Pxy. */
  psd: Float64Array;
}

/** One-sided averaged cross spectrum Pxy = mean(conj(X)·Y)·scale. */
export interface WelchCrossResult {
  binHz: number;
  segmentLength: number;
  segments: number;
  re: Float64Array;
  im: Float64Array;
  /** Pxx over the same segments (needed for the H1 estimate). */
  pxx: Float64Array;
  /** Pyy over the same segments (for coherence). */
  pyy: Float64Array;
}

interface Segmentation {
  segmentLength: number;
  step: number;
  segments: number;
  window: Float64Array;
  scale: number;
}

function segmentation(fn: string, length: number, sampleRate: number, options: WelchOptions): Segmentation {
  requirePositive(sampleRate, fn, 'sampleRate');
  const segmentLength = options.segmentLength ?? Math.min(256, length);
  precondition(isPowerOfTwo(segmentLength) && segmentLength >= 2, fn, `segmentLength must be a power of two ≥ 2 (got ${segmentLength})`);
  precondition(length >= segmentLength, fn, `signal (${length} samples) is shorter than one segment (${segmentLength})`);
  const overlap = options.overlap ?? Math.floor(segmentLength / 2);
  precondition(Number.isInteger(overlap) && overlap >= 0 && overlap < segmentLength, fn, `overlap must be an integer in 0…${segmentLength - 1} (got ${overlap})`);
  const window = createWindow(options.window ?? 'hann', segmentLength, 'periodic');
  let s = 0;
  let s2 = 0;
  for (let i = 0; i < segmentLength; i++) {
    s += window[i] as number;
    s2 += (window[i] as number) ** 2;
  }
  const scale = (options.scaling ?? 'density') === 'density' ? 1 / (sampleRate * s2) : 1 / (s * s);
  const step = segmentLength - overlap;
  // As scipy: only whole segments, no padding at the end.
  const segments = Math.floor((length - overlap) / step);
  return { segmentLength, step, segments, window, scale };
}

function fillSegment(x: Float64Array, start: number, seg: Segmentation, detrend: boolean, buffer: Float64Array): void {
  let mean = 0;
  if (detrend) {
    for (let i = 0; i < seg.segmentLength; i++) mean += x[start + i] as number;
    mean /= seg.segmentLength;
  }
  for (let i = 0; i < seg.segmentLength; i++) buffer[i] = ((x[start + i] as number) - mean) * (seg.window[i] as number);
}

/** Doubles the one-sided bins that stand for two (all but DC and, for even N, Nyquist). */
function foldOneSided(values: Float64Array): void {
  for (let k = 1; k < values.length - 1; k++) values[k] = (values[k] as number) * 2;
}

/**
 * Welch's averaged, modified periodogram: the signal is cut into overlapping windowed segments,
 * each periodogram is computed by FFT, and the periodograms are averaged (mean), reducing the
 * variance of a noise spectrum by about the number of segments.
 * @throws RangeError on bad options or a signal shorter than one segment
 * @see P. D. Welch, "The use of fast Fourier transform for the estimation of power spectra",
 *   IEEE Trans. Audio Electroacoust. 15(2), 1967; scaling as scipy.signal.welch
 */
export function welchPsd(x: Float64Array, sampleRate: number, options: WelchOptions = {}): WelchResult {
  const fn = 'welchPsd';
  const seg = segmentation(fn, x.length, sampleRate, options);
  const plan = createRealFftPlan(seg.segmentLength);
  const buffer = new Float64Array(seg.segmentLength);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  const psd = new Float64Array(plan.bins);
  const detrend = (options.detrend ?? 'constant') === 'constant';
  for (let s = 0; s < seg.segments; s++) {
    fillSegment(x, s * seg.step, seg, detrend, buffer);
    plan.forward(buffer, re, im);
    for (let k = 0; k < plan.bins; k++) psd[k] = (psd[k] as number) + (re[k] as number) ** 2 + (im[k] as number) ** 2;
  }
  const norm = seg.scale / seg.segments;
  for (let k = 0; k < plan.bins; k++) psd[k] = (psd[k] as number) * norm;
  foldOneSided(psd);
  return { binHz: sampleRate / seg.segmentLength, segmentLength: seg.segmentLength, segments: seg.segments, psd };
}

/**
 * Welch-averaged cross spectrum Pxy = ⟨conj(X)·Y⟩ (scipy.signal.csd convention), with Pxx and
 * Pyy over the same segments; H1 = Pxy/Pxx estimates the transfer function from x to y with
 * noise at the output averaged out.
 * @throws RangeError when x and y differ in length, or on bad options
 * @see J. S. Bendat, A. G. Piersol, "Random Data", 4th ed., Wiley 2010, §9.2 (H1 estimator)
 */
export function welchCrossSpectrum(x: Float64Array, y: Float64Array, sampleRate: number, options: WelchOptions = {}): WelchCrossResult {
  const fn = 'welchCrossSpectrum';
  precondition(x.length === y.length, fn, `x and y must have equal lengths (got ${x.length}, ${y.length})`);
  const seg = segmentation(fn, x.length, sampleRate, options);
  const plan = createRealFftPlan(seg.segmentLength);
  const bx = new Float64Array(seg.segmentLength);
  const by = new Float64Array(seg.segmentLength);
  const xr = new Float64Array(plan.bins);
  const xi = new Float64Array(plan.bins);
  const yr = new Float64Array(plan.bins);
  const yi = new Float64Array(plan.bins);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  const pxx = new Float64Array(plan.bins);
  const pyy = new Float64Array(plan.bins);
  const detrend = (options.detrend ?? 'constant') === 'constant';
  for (let s = 0; s < seg.segments; s++) {
    fillSegment(x, s * seg.step, seg, detrend, bx);
    fillSegment(y, s * seg.step, seg, detrend, by);
    plan.forward(bx, xr, xi);
    plan.forward(by, yr, yi);
    for (let k = 0; k < plan.bins; k++) {
      const ar = xr[k] as number;
      const ai = xi[k] as number;
      const br = yr[k] as number;
      const bi = yi[k] as number;
      re[k] = (re[k] as number) + ar * br + ai * bi;
      im[k] = (im[k] as number) + ar * bi - ai * br;
      pxx[k] = (pxx[k] as number) + ar * ar + ai * ai;
      pyy[k] = (pyy[k] as number) + br * br + bi * bi;
    }
  }
  const norm = seg.scale / seg.segments;
  for (const a of [re, im, pxx, pyy]) {
    for (let k = 0; k < plan.bins; k++) a[k] = (a[k] as number) * norm;
    foldOneSided(a);
  }
  return { binHz: sampleRate / seg.segmentLength, segmentLength: seg.segmentLength, segments: seg.segments, re, im, pxx, pyy };
}
