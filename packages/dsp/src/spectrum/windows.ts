import { precondition } from '../util/preconditions.js';

/** Window shapes the engine offers. */
export type WindowKind = 'rectangular' | 'hann' | 'hamming' | 'blackman' | 'blackman-harris' | 'flat-top';

/** All window kinds, for validation and iteration. */
export const WINDOW_KINDS: readonly WindowKind[] = ['rectangular', 'hann', 'hamming', 'blackman', 'blackman-harris', 'flat-top'];

/**
 * `symmetric`: w[n] = w[M−1−n], for filter design and zero-phase frames of odd length.
 * `periodic` (DFT-even): one period of a window of length M+1 with its last sample dropped,
 * for spectral analysis and overlap-add.
 */
export type WindowSymmetry = 'symmetric' | 'periodic';

/**
 * Sum-of-cosines coefficients a_k in w[n] = Σ (−1)^k·a_k·cos(2πkn/D).
 * Hann, Hamming, Blackman and the 4-term Blackman-Harris (−92 dB) from Harris 1978
 * (Proc. IEEE 66(1), tables I and III); the flat-top coefficients are the five-term set of
 * G. D'Antona, A. Ferrero, "Digital Signal Processing for Measurement Systems", Springer 2006,
 * p. 70 (the set scipy.signal.windows.flattop uses).
 */
const COSINE_COEFFICIENTS: Record<Exclude<WindowKind, 'rectangular'>, readonly number[]> = {
  hann: [0.5, 0.5],
  hamming: [0.54, 0.46],
  blackman: [0.42, 0.5, 0.08],
  'blackman-harris': [0.35875, 0.48829, 0.14128, 0.01168],
  'flat-top': [0.21557895, 0.41663158, 0.277263158, 0.083578947, 0.006947368],
};

/**
 * Builds a window of `length` samples.
 * @param kind window shape
 * @param length M ≥ 1 (M = 1 gives [1], as scipy.signal.get_window does)
 * @param symmetry `periodic` (default, for spectra) or `symmetric`
 * @throws RangeError when length is not an integer ≥ 1 or the kind is unknown
 * @see F. J. Harris, "On the use of windows for harmonic analysis with the discrete Fourier
 *   transform", Proc. IEEE 66(1), 1978, pp. 51–83.
 */
export function createWindow(kind: WindowKind, length: number, symmetry: WindowSymmetry = 'periodic'): Float64Array {
  precondition(Number.isInteger(length) && length >= 1, 'createWindow', `length must be an integer ≥ 1 (got ${length})`);
  precondition(WINDOW_KINDS.includes(kind), 'createWindow', `unknown window kind "${String(kind)}"`);
  precondition(symmetry === 'periodic' || symmetry === 'symmetric', 'createWindow', `symmetry must be "periodic" or "symmetric"`);
  const w = new Float64Array(length);
  if (kind === 'rectangular' || length === 1) return w.fill(1);
  const a = COSINE_COEFFICIENTS[kind];
  // A periodic window of length M is the symmetric window of length M+1 without its last sample.
  const denominator = symmetry === 'symmetric' ? length - 1 : length;
  for (let n = 0; n < length; n++) {
    const theta = (2 * Math.PI * n) / denominator;
    let v = 0;
    for (let k = 0; k < a.length; k++) v += (k % 2 === 0 ? 1 : -1) * (a[k] as number) * Math.cos(k * theta);
    w[n] = v;
  }
  return w;
}

/**
 * Coherent gain CG = (1/M)·Σ w[n]: the factor by which the window scales a sinusoid's
 * amplitude at its bin centre.
 * @throws RangeError on an empty window
 * @see Harris 1978, §IV, eq. (14)
 */
export function coherentGain(window: Float64Array): number {
  precondition(window.length > 0, 'coherentGain', 'window must not be empty');
  let s = 0;
  for (let i = 0; i < window.length; i++) s += window[i] as number;
  return s / window.length;
}

/**
 * Equivalent noise bandwidth in bins, ENBW = M·Σw²/(Σw)².
 * @throws RangeError on an empty window or one whose samples sum to zero
 * @see Harris 1978, §IV, eq. (16)
 */
export function equivalentNoiseBandwidth(window: Float64Array): number {
  precondition(window.length > 0, 'equivalentNoiseBandwidth', 'window must not be empty');
  let s = 0;
  let s2 = 0;
  for (let i = 0; i < window.length; i++) {
    const v = window[i] as number;
    s += v;
    s2 += v * v;
  }
  precondition(s !== 0, 'equivalentNoiseBandwidth', 'window samples sum to zero');
  return (window.length * s2) / (s * s);
}

/**
 * Multiplies `signal` by `window` into `output` (may be `signal` itself).
 * @throws RangeError when lengths differ
 */
export function applyWindow(signal: Float64Array, window: Float64Array, output: Float64Array = new Float64Array(signal.length)): Float64Array {
  precondition(signal.length === window.length && output.length === signal.length, 'applyWindow', `signal, window and output must have equal lengths (got ${signal.length}, ${window.length}, ${output.length})`);
  for (let i = 0; i < signal.length; i++) output[i] = (signal[i] as number) * (window[i] as number);
  return output;
}
