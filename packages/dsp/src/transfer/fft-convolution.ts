import { createRealFftPlan } from '../fft/real-fft.js';
import { nextPowerOfTwo, precondition } from '../util/preconditions.js';

/**
 * Full linear convolution (length a + b − 1) by zero-padded FFTs.
 * @throws RangeError when either input is empty
 * @see Oppenheim & Schafer, "Discrete-Time Signal Processing", §8.7 (linear convolution with the DFT)
 */
export function fftConvolve(a: Float64Array, b: Float64Array): Float64Array {
  precondition(a.length >= 1 && b.length >= 1, 'fftConvolve', 'inputs must not be empty');
  const length = a.length + b.length - 1;
  const n = Math.max(2, nextPowerOfTwo(length));
  const plan = createRealFftPlan(n);
  const buf = new Float64Array(n);
  buf.set(a);
  const ar = new Float64Array(plan.bins);
  const ai = new Float64Array(plan.bins);
  plan.forward(buf, ar, ai);
  buf.fill(0);
  buf.set(b);
  const br = new Float64Array(plan.bins);
  const bi = new Float64Array(plan.bins);
  plan.forward(buf, br, bi);
  for (let k = 0; k < plan.bins; k++) {
    const r = (ar[k] as number) * (br[k] as number) - (ai[k] as number) * (bi[k] as number);
    const i = (ar[k] as number) * (bi[k] as number) + (ai[k] as number) * (br[k] as number);
    ar[k] = r;
    ai[k] = i;
  }
  plan.inverse(ar, ai, buf);
  return buf.slice(0, length);
}

/** Cross-correlation with its lag axis. */
export interface CrossCorrelation {
  /** r[lag] = Σ_n y[n + lag]·x[n] for lag = minLag … maxLag. */
  values: Float64Array;
  /** Lag of values[0] (negative: y leads x). */
  minLag: number;
}

/**
 * Full cross-correlation r[ℓ] = Σ y[n+ℓ]·x[n], ℓ = −(len x − 1) … len y − 1, by FFT
 * (scipy.signal.correlate(y, x, 'full') order).
 * @throws RangeError when either input is empty
 * @see Oppenheim & Schafer, §2.10 (cross-correlation as convolution with a time-reversed sequence)
 */
export function fftCrossCorrelate(x: Float64Array, y: Float64Array): CrossCorrelation {
  precondition(x.length >= 1 && y.length >= 1, 'fftCrossCorrelate', 'inputs must not be empty');
  const reversed = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) reversed[i] = x[x.length - 1 - i] as number;
  return { values: fftConvolve(y, reversed), minLag: -(x.length - 1) };
}

/**
 * Latency of `capture` against `reference` in whole samples: the lag of the largest
 * |cross-correlation| (polarity-blind). A copy delayed by d samples reads exactly d.
 * @param maxLag optional bound on |lag| searched
 * @throws RangeError when either input is empty
 * @see C. H. Knapp, G. C. Carter, "The generalized correlation method for estimation of time
 *   delay", IEEE Trans. ASSP 24(4), 1976 (plain cross-correlation as the base case)
 */
export function estimateLatency(reference: Float64Array, capture: Float64Array, maxLag?: number): number {
  const { values, minLag } = fftCrossCorrelate(reference, capture);
  let best = -Infinity;
  let bestLag = 0;
  for (let i = 0; i < values.length; i++) {
    const lag = i + minLag;
    if (maxLag !== undefined && Math.abs(lag) > maxLag) continue;
    const v = Math.abs(values[i] as number);
    if (v > best) {
      best = v;
      bestLag = lag;
    }
  }
  return bestLag;
}
