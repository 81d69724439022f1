import { precondition, requirePositive } from '../util/preconditions.js';

/**
 * 1/N-octave smoothing of a per-bin power quantity (|H|² or |X|²): each bin k ≥ 1 becomes the
 * mean of the included bins j with f_k·2^(−1/(2N)) ≤ f_j ≤ f_k·2^(1/(2N)), a rectangular window
 * one 1/N octave wide centred on f_k on a log axis. Power (not dB) is averaged. Bins whose
 * window holds no included bin (and bin 0) are copied unchanged. O(bins) by prefix sums.
 * @param values one-sided per-bin power, bin k at k·binHz
 * @param fraction N (1, 3, 6, 12, 24 …)
 * @param include optional 0/1 per bin: only these bins enter the averages (bins without stimulus energy stay out)
 * @throws RangeError on a non-positive bin spacing or fraction, or when `include` has another length
 * @see P. D. Hatziantoniou, J. N. Mourjopoulos, "Generalized fractional-octave smoothing of audio
 *   and acoustic responses", J. Audio Eng. Soc. 48(4), 2000 (rectangular smoothing window)
 */
export function smoothFractionalOctave(values: Float64Array, binHz: number, fraction: number, include?: Uint8Array): Float64Array {
  const fn = 'smoothFractionalOctave';
  requirePositive(binHz, fn, 'binHz');
  requirePositive(fraction, fn, 'fraction');
  precondition(!include || include.length === values.length, fn, 'include must have one entry per bin');
  const n = values.length;
  const sum = new Float64Array(n + 1);
  const count = new Float64Array(n + 1);
  for (let k = 0; k < n; k++) {
    const use = !include || include[k] ? 1 : 0;
    sum[k + 1] = (sum[k] as number) + (use ? (values[k] as number) : 0);
    count[k + 1] = (count[k] as number) + use;
  }
  const half = 2 ** (1 / (2 * fraction));
  const out = Float64Array.from(values);
  for (let k = 1; k < n; k++) {
    const lo = Math.max(1, Math.ceil(k / half - 1e-9));
    const hi = Math.min(n - 1, Math.floor(k * half + 1e-9));
    const c = (count[hi + 1] as number) - (count[lo] as number);
    if (c > 0) out[k] = ((sum[hi + 1] as number) - (sum[lo] as number)) / c;
  }
  return out;
}
