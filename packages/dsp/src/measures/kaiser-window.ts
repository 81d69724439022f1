import { precondition } from '../util/preconditions.js';

/**
 * Modified Bessel function of the first kind, order 0, by its power series
 * I0(x) = Σ ((x/2)^k / k!)², summed until a term no longer changes the sum.
 * @throws RangeError on a non-finite argument
 * @see M. Abramowitz, I. A. Stegun, "Handbook of Mathematical Functions", 1964, eq. 9.6.12
 */
export function besselI0(x: number): number {
  if (!Number.isFinite(x)) precondition(false, 'besselI0', `x must be finite (got ${x})`);
  const q = (x * x) / 4;
  let term = 1;
  let sum = 1;
  for (let k = 1; k < 500; k++) {
    term *= q / (k * k);
    sum += term;
    if (term < sum * 1e-17) break;
  }
  return sum;
}

/**
 * Symmetric Kaiser window w[n] = I0(β·√(1 − (2n/(M−1) − 1)²))/I0(β), n = 0…M−1 (the form
 * numpy.kaiser uses). Only half is computed; the other half is mirrored.
 * @param length M ≥ 1 (M = 1 gives [1])
 * @param beta shape β ≥ 0 (β = 20: highest sidelobe about −160 dB)
 * @throws RangeError when length is not an integer ≥ 1 or beta is negative or not finite
 * @see J. F. Kaiser, R. W. Schafer, "On the use of the I0-sinh window for spectrum analysis",
 *   IEEE Trans. ASSP 28(1), 1980
 */
export function kaiserWindow(length: number, beta: number): Float64Array {
  const fn = 'kaiserWindow';
  precondition(Number.isInteger(length) && length >= 1, fn, `length must be an integer ≥ 1 (got ${length})`);
  precondition(Number.isFinite(beta) && beta >= 0, fn, `beta must be a finite number ≥ 0 (got ${beta})`);
  const w = new Float64Array(length);
  if (length === 1) return w.fill(1);
  const norm = 1 / besselI0(beta);
  const last = length - 1;
  for (let n = 0; n <= last / 2; n++) {
    const r = (2 * n) / last - 1;
    const v = besselI0(beta * Math.sqrt(Math.max(0, 1 - r * r))) * norm;
    w[n] = v;
    w[last - n] = v;
  }
  return w;
}

/**
 * Fourier transform of the continuous Kaiser window of width L = M − 1 samples, which the
 * DTFT of the sampled window follows closely (the window is about 1/I0(β) at its ends, so
 * sampling adds only far-sidelobe aliasing):
 * W(ω) = L·sinh(√(β² − (ωL/2)²)) / (I0(β)·√(β² − (ωL/2)²)), sinh turning into sin past the main lobe.
 * @param omega angular frequency in radians per sample
 * @param length M ≥ 2
 * @param beta β ≥ 0
 * @param i0Beta I0(β), passed in so hot loops need not recompute it
 * @throws RangeError when length < 2
 * @see Kaiser & Schafer 1980 (the I0-sinh transform pair)
 */
export function kaiserTransform(omega: number, length: number, beta: number, i0Beta = besselI0(beta)): number {
  if (!(length >= 2)) precondition(false, 'kaiserTransform', `length must be ≥ 2 (got ${length})`);
  const half = length - 1;
  const x = (omega * half) / 2;
  const d = beta * beta - x * x;
  if (Math.abs(d) < 1e-12) return half / i0Beta;
  const s = Math.sqrt(Math.abs(d));
  return (half * (d > 0 ? Math.sinh(s) : Math.sin(s))) / (s * i0Beta);
}

/**
 * Main-lobe half-width of a length-M Kaiser window in cycles per sample: the first zero of
 * `kaiserTransform`, √(β² + π²)/(π·(M − 1)).
 * @throws RangeError when length < 2
 * @see Kaiser & Schafer 1980
 */
export function kaiserMainLobeHalfWidth(length: number, beta: number): number {
  precondition(length >= 2, 'kaiserMainLobeHalfWidth', `length must be ≥ 2 (got ${length})`);
  return Math.sqrt(beta * beta + Math.PI * Math.PI) / (Math.PI * (length - 1));
}
