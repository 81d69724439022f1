import FFT from 'fft.js';
import { isPowerOfTwo, precondition } from '../util/preconditions.js';

/**
 * A real-input FFT of one fixed power-of-two size. The one-sided spectrum X[0…N/2] is held
 * in two caller-owned arrays of length N/2 + 1 (real and imaginary parts).
 */
export interface RealFftPlan {
  /** Transform length N. */
  readonly size: number;
  /** Number of one-sided bins, N/2 + 1. */
  readonly bins: number;
  /**
   * X[k] = Σ x[n]·e^{−2πikn/N} for k = 0…N/2, unscaled (numpy.fft.rfft convention).
   * @throws RangeError on buffer length mismatch
   */
  forward(input: Float64Array, re: Float64Array, im: Float64Array): void;
  /**
   * Inverse of `forward` (numpy.fft.irfft convention, scaled by 1/N); the imaginary parts of
   * the DC and Nyquist bins are ignored, as a real signal cannot carry them.
   * @throws RangeError on buffer length mismatch
   */
  inverse(re: Float64Array, im: Float64Array, output: Float64Array): void;
}

/**
 * Builds a real FFT plan: the N real samples are read as N/2 complex samples
 * z[n] = x[2n] + i·x[2n+1], transformed by a half-size complex FFT, and split into the
 * spectra of the even and odd samples, X[k] = E[k] + W^k·O[k] with W = e^{−2πi/N}.
 *
 * NOTE: the half-size transform reads the input buffer in place (no packing copy) and the split
 * fills bins k and N/2−k together; measured against fft.js's own `realTransform` and numpy in
 * docs/performance.md.
 * @param size N, a power of two ≥ 2
 * @throws RangeError when size is not a power of two ≥ 2
 * @see W. H. Press et al., Numerical Recipes, 3rd ed., §12.3.2 "FFT of real functions"
 *   (two-for-one packing and the split formula).
 */
export function createRealFftPlan(size: number): RealFftPlan {
  precondition(isPowerOfTwo(size) && size >= 2, 'createRealFftPlan', `size must be a power of two ≥ 2 (got ${size})`);
  // Plans are shared: building one costs as much as several transforms (twiddle tables), and a
  // plan's scratch is only used inside one synchronous call, so callers cannot disturb each other.
  const cached = planCache.get(size);
  if (cached) {
    planCache.delete(size);
    planCache.set(size, cached);
    return cached;
  }
  const plan = buildRealFftPlan(size);
  planCache.set(size, plan);
  if (planCache.size > PLAN_CACHE_SIZES) planCache.delete(planCache.keys().next().value as number);
  return plan;
}

/** Most plan sizes kept (least recently used dropped): a 2²¹ plan holds about 60 MiB of tables and scratch. */
const PLAN_CACHE_SIZES = 6;
const planCache = new Map<number, RealFftPlan>();

/**
 * Drops every cached plan. For a long-lived thread after a large task: the plans of a long
 * capture hold hundreds of MiB that would otherwise stay resident until six other sizes push them out.
 */
export function releaseFftPlans(): void {
  planCache.clear();
}

function buildRealFftPlan(size: number): RealFftPlan {
  const half = size / 2;
  const bins = half + 1;
  // NOTE: hot path: the messages are only built when a check fails.
  const checkSpectrum = (fn: string, re: Float64Array, im: Float64Array): void => {
    if (re.length !== bins || im.length !== bins) precondition(false, fn, `re and im must hold ${bins} values (got ${re.length}, ${im.length})`);
  };
  const checkSignal = (fn: string, x: Float64Array, name: string): void => {
    if (x.length !== size) precondition(false, fn, `${name} must hold ${size} samples (got ${x.length})`);
  };

  if (half === 1) {
    // fft.js needs a size ≥ 2; the two-point case is a single butterfly.
    return {
      size,
      bins,
      forward(input, re, im) {
        checkSignal('RealFftPlan.forward', input, 'input');
        checkSpectrum('RealFftPlan.forward', re, im);
        const a = input[0] as number;
        const b = input[1] as number;
        re[0] = a + b;
        re[1] = a - b;
        im[0] = 0;
        im[1] = 0;
      },
      inverse(re, im, output) {
        checkSpectrum('RealFftPlan.inverse', re, im);
        checkSignal('RealFftPlan.inverse', output, 'output');
        const a = re[0] as number;
        const b = re[1] as number;
        output[0] = (a + b) / 2;
        output[1] = (a - b) / 2;
      },
    };
  }

  const fft = new FFT(half);
  const z = new Float64Array(size);
  const zIn = new Float64Array(size);
  // cos and sin of 2πk/N for k = 0…N/2, computed directly (not by recurrence) for accuracy.
  const cosT = new Float64Array(bins);
  const sinT = new Float64Array(bins);
  for (let k = 0; k < bins; k++) {
    const a = (2 * Math.PI * k) / size;
    cosT[k] = Math.cos(a);
    sinT[k] = Math.sin(a);
  }

  return {
    size,
    bins,
    forward(input, re, im) {
      checkSignal('RealFftPlan.forward', input, 'input');
      checkSpectrum('RealFftPlan.forward', re, im);
      fft.transform(z, input);
      // k = 0 and k = N/2 read Z[0] only: X[0] = Re Z0 + Im Z0, X[N/2] = Re Z0 − Im Z0.
      const z0r = z[0] as number;
      const z0i = z[1] as number;
      re[0] = z0r + z0i;
      im[0] = 0;
      re[half] = z0r - z0i;
      im[half] = 0;
      // NOTE: bins k and M−k read the same pair Z[k], Z[M−k]; one pass over k ≤ M/2 fills both.
      for (let k = 1, j = half - 1; k <= j; k++, j--) {
        const zr = z[2 * k] as number;
        const zi = z[2 * k + 1] as number;
        const cr = z[2 * j] as number;
        const ci = z[2 * j + 1] as number;
        // E = (Z[k] + conj Z[M−k]) / 2, O = (Z[k] − conj Z[M−k]) / 2i
        const er = 0.5 * (zr + cr);
        const ei = 0.5 * (zi - ci);
        const or = 0.5 * (zi + ci);
        const oi = -0.5 * (zr - cr);
        const c = cosT[k] as number;
        const s = sinT[k] as number;
        // X[k] = E + W^k·O with W^k = c − i·s
        const tr = c * or + s * oi;
        const ti = c * oi - s * or;
        re[k] = er + tr;
        im[k] = ei + ti;
        // X[M−k] = conj(E) − conj(W^k·O), since W^{M−k} = −conj(W^k) and E, O are Hermitian in k
        re[j] = er - tr;
        im[j] = -ei + ti;
      }
    },
    inverse(re, im, output) {
      checkSpectrum('RealFftPlan.inverse', re, im);
      checkSignal('RealFftPlan.inverse', output, 'output');
      for (let k = 0; k < half; k++) {
        const j = half - k;
        const xr = re[k] as number;
        const xi = k === 0 ? 0 : (im[k] as number);
        const yr = re[j] as number;
        const yi = j === half ? 0 : (im[j] as number);
        // E = (X[k] + conj X[M−k]) / 2, O = (X[k] − conj X[M−k]) / (2·W^k)
        const er = 0.5 * (xr + yr);
        const ei = 0.5 * (xi - yi);
        const dr = 0.5 * (xr - yr);
        const di = 0.5 * (xi + yi);
        const c = cosT[k] as number;
        const s = sinT[k] as number;
        const or = dr * c - di * s;
        const oi = dr * s + di * c;
        // Z = E + i·O
        zIn[2 * k] = er - oi;
        zIn[2 * k + 1] = ei + or;
      }
      fft.inverseTransform(output, zIn);
    },
  };
}
