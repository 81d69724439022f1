import { precondition } from '../util/preconditions.js';

/** A refined spectral peak. */
export interface RefinedPeak {
  /** Fractional bin index k + δ, δ ∈ [−½, ½]. */
  bin: number;
  /** Interpolated peak magnitude (same unit as the input magnitudes). */
  magnitude: number;
}

/**
 * Refines a local maximum of a magnitude spectrum by fitting a parabola through the dB values
 * α, β, γ of bins k−1, k, k+1: δ = ½(α−γ)/(α−2β+γ), peak dB = β − ¼(α−γ)·δ. With zero padding
 * (and a smooth window) the remaining bias is a small fraction of a bin.
 * @param magnitude linear magnitudes
 * @param k index of a local maximum, 1 ≤ k ≤ length−2 (edges are returned unrefined)
 * @throws RangeError when k is outside the spectrum
 * @see E. Jacobsen, P. Kootsookos, "Fast, accurate frequency estimators", IEEE Signal
 *   Processing Magazine 24(3), 2007; J. O. Smith III, "Spectral Audio Signal Processing",
 *   "Quadratic interpolation of spectral peaks"
 */
export function refinePeak(magnitude: Float64Array, k: number): RefinedPeak {
  precondition(Number.isInteger(k) && k >= 0 && k < magnitude.length, 'refinePeak', `k must be a bin index 0…${magnitude.length - 1} (got ${k})`);
  const beta = magnitude[k] as number;
  if (k === 0 || k === magnitude.length - 1) return { bin: k, magnitude: beta };
  const a = 20 * Math.log10(magnitude[k - 1] as number);
  const b = 20 * Math.log10(beta);
  const c = 20 * Math.log10(magnitude[k + 1] as number);
  const denominator = a - 2 * b + c;
  if (!Number.isFinite(denominator) || denominator >= 0) return { bin: k, magnitude: beta };
  const delta = Math.max(-0.5, Math.min(0.5, (0.5 * (a - c)) / denominator));
  return { bin: k + delta, magnitude: 10 ** ((b - 0.25 * (a - c) * delta) / 20) };
}

/**
 * Index of the largest value in `values[from…to)` (first on ties).
 * @throws RangeError on an empty or out-of-range span
 */
export function argMax(values: Float64Array, from = 0, to = values.length): number {
  precondition(Number.isInteger(from) && Number.isInteger(to) && from >= 0 && to <= values.length && from < to, 'argMax', `span ${from}…${to} is empty or outside 0…${values.length}`);
  let best = from;
  let bestValue = values[from] as number;
  for (let i = from + 1; i < to; i++) {
    const v = values[i] as number;
    if (v > bestValue) {
      bestValue = v;
      best = i;
    }
  }
  return best;
}
