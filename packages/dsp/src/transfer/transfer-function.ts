import { createRealFftPlan } from '../fft/real-fft.js';
import { welchCrossSpectrum } from '../spectrum/welch.js';
import { nextPowerOfTwo, precondition, requirePositive } from '../util/preconditions.js';

/** Options of `estimateTransferFunction`. */
export interface TransferFunctionOptions {
  /**
   * `h1` (default): Welch-averaged Pxy/Pxx, for noise and multitone stimuli (noise at the output
   * averages out). `deconvolution`: one long regularised spectral division Y·conj(X)/(|X|² + ε), for
   * sweeps (Farina's method) and any deterministic stimulus.
   */
  method?: 'h1' | 'deconvolution';
  /** Welch segment length for `h1` (default 8192, or the largest power of two that fits). */
  segmentLength?: number;
  /**
   * Bins whose reference power is below this fraction of the largest bin's (default 1e-6, −60 dB)
   * are marked invalid: the stimulus carries no energy there, so H is not measured.
   */
  validThreshold?: number;
  /** Tikhonov term ε as a fraction of max |X|² for `deconvolution` (default 1e-10). */
  regularization?: number;
}

/** A one-sided transfer function estimate H(f) = capture/reference. */
export interface TransferFunction {
  method: 'h1' | 'deconvolution';
  binHz: number;
  re: Float64Array;
  im: Float64Array;
  /** Reference power per bin (arbitrary scale), for weighting and validity. */
  referencePower: Float64Array;
  /** 1 where the reference has energy (see `validThreshold`), else 0 (H set to 0). */
  valid: Uint8Array;
}

/**
 * Transfer function from a reference (stimulus) to a capture of equal length, already aligned
 * (see `estimateLatency`).
 * @throws RangeError when lengths differ, the signals are too short or options are bad
 * @see J. S. Bendat, A. G. Piersol, "Random Data", 4th ed., §9.2 (H1 = Gxy/Gxx);
 *   A. Farina, "Simultaneous measurement of impulse response and distortion with a swept-sine
 *   technique", AES 108th Convention, preprint 5093, 2000 (deconvolution of a sweep);
 *   A. N. Tikhonov regularisation of the spectral division
 */
export function estimateTransferFunction(reference: Float64Array, capture: Float64Array, sampleRate: number, options: TransferFunctionOptions = {}): TransferFunction {
  const fn = 'estimateTransferFunction';
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(reference.length === capture.length, fn, `reference and capture must have equal lengths (got ${reference.length}, ${capture.length})`);
  precondition(reference.length >= 16, fn, `signals must hold at least 16 samples (got ${reference.length})`);
  const method = options.method ?? 'h1';
  const validThreshold = options.validThreshold ?? 1e-6;
  let re: Float64Array;
  let im: Float64Array;
  let referencePower: Float64Array;
  let binHz: number;
  if (method === 'h1') {
    let segmentLength = options.segmentLength ?? 8192;
    while (segmentLength > reference.length) segmentLength /= 2;
    const cross = welchCrossSpectrum(reference, capture, sampleRate, { segmentLength, overlap: segmentLength / 2, detrend: 'none' });
    re = cross.re;
    im = cross.im;
    referencePower = cross.pxx;
    binHz = cross.binHz;
    for (let k = 0; k < re.length; k++) {
      const p = referencePower[k] as number;
      re[k] = p > 0 ? (re[k] as number) / p : 0;
      im[k] = p > 0 ? (im[k] as number) / p : 0;
    }
  } else {
    precondition(method === 'deconvolution', fn, `method must be "h1" or "deconvolution" (got "${String(method)}")`);
    const n = nextPowerOfTwo(reference.length);
    const plan = createRealFftPlan(n);
    const buf = new Float64Array(n);
    buf.set(reference);
    const xr = new Float64Array(plan.bins);
    const xi = new Float64Array(plan.bins);
    plan.forward(buf, xr, xi);
    buf.fill(0);
    buf.set(capture);
    re = new Float64Array(plan.bins);
    im = new Float64Array(plan.bins);
    plan.forward(buf, re, im);
    referencePower = new Float64Array(plan.bins);
    let max = 0;
    for (let k = 0; k < plan.bins; k++) {
      const p = (xr[k] as number) ** 2 + (xi[k] as number) ** 2;
      referencePower[k] = p;
      if (p > max) max = p;
    }
    const eps = (options.regularization ?? 1e-10) * max;
    for (let k = 0; k < plan.bins; k++) {
      const ar = xr[k] as number;
      const ai = xi[k] as number;
      const br = re[k] as number;
      const bi = im[k] as number;
      const d = (referencePower[k] as number) + eps;
      // Y·conj(X)/(|X|² + ε)
      re[k] = d > 0 ? (br * ar + bi * ai) / d : 0;
      im[k] = d > 0 ? (bi * ar - br * ai) / d : 0;
    }
    binHz = sampleRate / n;
  }
  let max = 0;
  for (const p of referencePower) if (p > max) max = p;
  const valid = new Uint8Array(re.length);
  for (let k = 0; k < re.length; k++) {
    if (max > 0 && (referencePower[k] as number) >= validThreshold * max) valid[k] = 1;
    else {
      re[k] = 0;
      im[k] = 0;
    }
  }
  return { method, binHz, re, im, referencePower, valid };
}

/**
 * Impulse response by regularised deconvolution, h = IFFT(Y·conj(X)/(|X|² + ε)), over a buffer long
 * enough that the harmonic responses of an exponential sweep (which fall before the linear one,
 * at negative times) wrap to the end instead of overlapping it.
 * @param regularization ε as a fraction of max |X|² (default 1e-10)
 * @returns the full circular response; index d holds the response at delay d samples
 * @throws RangeError on empty inputs
 * @see A. Farina, AES 108th Convention, preprint 5093, 2000
 */
export function impulseResponseByDeconvolution(stimulus: Float64Array, capture: Float64Array, regularization = 1e-10): Float64Array {
  const fn = 'impulseResponseByDeconvolution';
  precondition(stimulus.length >= 2 && capture.length >= 2, fn, 'stimulus and capture must hold at least 2 samples');
  precondition(regularization >= 0, fn, `regularization must be ≥ 0 (got ${regularization})`);
  const n = nextPowerOfTwo(stimulus.length + capture.length);
  const plan = createRealFftPlan(n);
  const buf = new Float64Array(n);
  buf.set(stimulus);
  const xr = new Float64Array(plan.bins);
  const xi = new Float64Array(plan.bins);
  plan.forward(buf, xr, xi);
  buf.fill(0);
  buf.set(capture);
  const yr = new Float64Array(plan.bins);
  const yi = new Float64Array(plan.bins);
  plan.forward(buf, yr, yi);
  let max = 0;
  for (let k = 0; k < plan.bins; k++) max = Math.max(max, (xr[k] as number) ** 2 + (xi[k] as number) ** 2);
  const eps = regularization * max;
  for (let k = 0; k < plan.bins; k++) {
    const ar = xr[k] as number;
    const ai = xi[k] as number;
    const br = yr[k] as number;
    const bi = yi[k] as number;
    const d = ar * ar + ai * ai + eps;
    yr[k] = d > 0 ? (br * ar + bi * ai) / d : 0;
    yi[k] = d > 0 ? (bi * ar - br * ai) / d : 0;
  }
  plan.inverse(yr, yi, buf);
  return buf;
}
