import { precondition, requirePositive } from '../util/preconditions.js';

/** Second-order section normalised so that a0 = 1: H(z) = (b0 + b1·z⁻¹ + b2·z⁻²)/(1 + a1·z⁻¹ + a2·z⁻²). */
export interface BiquadCoefficients {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

function checkDesign(fn: string, fs: number, f0: number, q: number): void {
  requirePositive(fs, fn, 'fs');
  requirePositive(q, fn, 'q');
  precondition(f0 > 0 && f0 < fs / 2, fn, `f0 must lie in (0, fs/2) (got ${f0} Hz at fs ${fs} Hz)`);
}

/**
 * Peaking EQ biquad: gain `gainDb` at f0 (exactly, |H(e^{jω0})| = 10^(gainDb/20)), 0 dB far from
 * it, bandwidth set by Q. A = 10^(gainDb/40), ω0 = 2π·f0/fs, α = sin ω0/(2Q);
 * b = [1 + αA, −2cos ω0, 1 − αA], a = [1 + α/A, −2cos ω0, 1 − α/A], divided by a0.
 * @throws RangeError unless fs > 0, 0 < f0 < fs/2 and q > 0
 * @see R. Bristow-Johnson, "Cookbook formulae for audio EQ biquad filter coefficients" (Audio EQ
 *   Cookbook), "peakingEQ"
 */
export function peakingEqCoefficients(fs: number, f0: number, gainDb: number, q: number): BiquadCoefficients {
  checkDesign('peakingEqCoefficients', fs, f0, q);
  const a = 10 ** (gainDb / 40);
  const w0 = (2 * Math.PI * f0) / fs;
  const alpha = Math.sin(w0) / (2 * q);
  const a0 = 1 + alpha / a;
  return { b0: (1 + alpha * a) / a0, b1: (-2 * Math.cos(w0)) / a0, b2: (1 - alpha * a) / a0, a1: (-2 * Math.cos(w0)) / a0, a2: (1 - alpha / a) / a0 };
}

/**
 * Second-order low-pass biquad (minimum phase); Q = 1/√2 gives a 2nd-order Butterworth response,
 * −3.01 dB at f0. b = [(1 − cos ω0)/2, 1 − cos ω0, (1 − cos ω0)/2], a = [1 + α, −2cos ω0, 1 − α].
 * @throws RangeError unless fs > 0, 0 < f0 < fs/2 and q > 0
 * @see R. Bristow-Johnson, Audio EQ Cookbook, "LPF"
 */
export function lowPassBiquadCoefficients(fs: number, f0: number, q = Math.SQRT1_2): BiquadCoefficients {
  checkDesign('lowPassBiquadCoefficients', fs, f0, q);
  const w0 = (2 * Math.PI * f0) / fs;
  const c = Math.cos(w0);
  const alpha = Math.sin(w0) / (2 * q);
  const a0 = 1 + alpha;
  return { b0: (1 - c) / 2 / a0, b1: (1 - c) / a0, b2: (1 - c) / 2 / a0, a1: (-2 * c) / a0, a2: (1 - alpha) / a0 };
}

/**
 * Filters x through one biquad (transposed direct form II, zero initial state); returns a new
 * array of the same length.
 * @throws RangeError when a coefficient is not finite
 * @see J. O. Smith III, "Introduction to Digital Filters", W3K 2007, "Transposed Direct-Forms"
 */
export function applyBiquad(x: Float64Array, coeffs: BiquadCoefficients): Float64Array {
  const { b0, b1, b2, a1, a2 } = coeffs;
  precondition([b0, b1, b2, a1, a2].every(Number.isFinite), 'applyBiquad', 'coefficients must be finite');
  const y = new Float64Array(x.length);
  let s1 = 0;
  let s2 = 0;
  for (let n = 0; n < x.length; n++) {
    const v = x[n] as number;
    const out = b0 * v + s1;
    s1 = b1 * v - a1 * out + s2;
    s2 = b2 * v - a2 * out;
    y[n] = out;
  }
  return y;
}

/**
 * Frequency response of a biquad at f: H(e^{jω}) with ω = 2π·f/fs, evaluated from the
 * coefficients (the closed form the tests compare measurements with).
 * @returns magnitude in dB (20·log10|H|) and phase in radians
 * @throws RangeError on a non-positive fs
 * @see definition of the z-transform evaluated on the unit circle (Oppenheim & Schafer §3)
 */
export function biquadResponse(coeffs: BiquadCoefficients, fs: number, f: number): { magnitudeDb: number; phaseRad: number } {
  requirePositive(fs, 'biquadResponse', 'fs');
  const w = (2 * Math.PI * f) / fs;
  const c1 = Math.cos(w);
  const s1 = -Math.sin(w);
  const c2 = Math.cos(2 * w);
  const s2 = -Math.sin(2 * w);
  const nr = coeffs.b0 + coeffs.b1 * c1 + coeffs.b2 * c2;
  const ni = coeffs.b1 * s1 + coeffs.b2 * s2;
  const dr = 1 + coeffs.a1 * c1 + coeffs.a2 * c2;
  const di = coeffs.a1 * s1 + coeffs.a2 * s2;
  const re = (nr * dr + ni * di) / (dr * dr + di * di);
  const im = (ni * dr - nr * di) / (dr * dr + di * di);
  return { magnitudeDb: 20 * Math.log10(Math.hypot(re, im)), phaseRad: Math.atan2(im, re) };
}
