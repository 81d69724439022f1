import { precondition } from '../util/preconditions.js';

/**
 * Group delay in samples of a rational filter B(z)/A(z) at the given normalised angular
 * frequencies ω (radians per sample), by the ramp-weighted DFT method: with
 * C(z) = B(z)·z^{−(P−1)}·Ā(1/z̄) (the convolution of b with the reversed, conjugated a),
 * τ(ω) = Re{ DTFT(n·c[n]) / DTFT(c[n]) } − (P − 1), P = length of a. Where |C(e^{jω})| is
 * below 10·ε the delay is undefined and 0 is returned (scipy's convention).
 * @param b numerator taps (FIR taps when `a` = [1])
 * @param a denominator coefficients (default [1])
 * @param omega angular frequencies in rad/sample
 * @throws RangeError on empty coefficients
 * @see J. O. Smith III, "Introduction to Digital Filters", W3K 2007, "Numerical computation of
 *   group delay"; same method as scipy.signal.group_delay
 */
export function filterGroupDelay(b: Float64Array, a: Float64Array = Float64Array.of(1), omega: Float64Array): Float64Array {
  const fn = 'filterGroupDelay';
  precondition(b.length >= 1 && a.length >= 1, fn, 'b and a must hold at least one coefficient');
  // c = b ⊛ reverse(a) (real coefficients, so conjugation is a no-op)
  const c = new Float64Array(b.length + a.length - 1);
  for (let i = 0; i < b.length; i++) {
    for (let j = 0; j < a.length; j++) c[i + j] = (c[i + j] as number) + (b[i] as number) * (a[a.length - 1 - j] as number);
  }
  const out = new Float64Array(omega.length);
  for (let f = 0; f < omega.length; f++) {
    const w = omega[f] as number;
    let nr = 0;
    let ni = 0;
    let dr = 0;
    let di = 0;
    for (let n = 0; n < c.length; n++) {
      const cs = Math.cos(w * n);
      const sn = -Math.sin(w * n);
      const v = c[n] as number;
      dr += v * cs;
      di += v * sn;
      nr += n * v * cs;
      ni += n * v * sn;
    }
    const den = dr * dr + di * di;
    if (Math.sqrt(den) < 10 * Number.EPSILON) {
      out[f] = 0;
      continue;
    }
    // Re{(nr + i·ni)/(dr + i·di)}
    out[f] = (nr * dr + ni * di) / den - (a.length - 1);
  }
  return out;
}

/**
 * Group delay τ = −dφ/dω from an unwrapped phase sampled at frequencies f (Hz), in seconds,
 * by central differences inside and one-sided differences at the ends.
 * @throws RangeError when fewer than two points are given, lengths differ, or frequencies
 *   do not strictly increase
 * @see A. V. Oppenheim, R. W. Schafer, "Discrete-Time Signal Processing", 3rd ed., §5.1.2
 *   (definition of group delay)
 */
export function groupDelayFromPhase(frequencyHz: Float64Array, unwrappedPhase: Float64Array): Float64Array {
  const fn = 'groupDelayFromPhase';
  const n = frequencyHz.length;
  precondition(n >= 2 && unwrappedPhase.length === n, fn, 'need at least two points and equal lengths');
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const lo = i === 0 ? 0 : i - 1;
    const hi = i === n - 1 ? n - 1 : i + 1;
    const df = (frequencyHz[hi] as number) - (frequencyHz[lo] as number);
    precondition(df > 0, fn, 'frequencies must strictly increase');
    out[i] = -((unwrappedPhase[hi] as number) - (unwrappedPhase[lo] as number)) / (2 * Math.PI * df);
  }
  return out;
}
