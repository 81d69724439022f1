import { precondition } from '../util/preconditions.js';

// Pole frequencies of the A-weighting network, IEC 61672-1:2013 annex E (f1, f2, f3, f4 in Hz).
const F1 = 20.598997;
const F2 = 107.65265;
const F3 = 737.86223;
const F4 = 12194.217;

/** Unnormalised A-weighting magnitude R_A(f). */
function ra(f: number): number {
  const f2 = f * f;
  return (F4 * F4 * f2 * f2) / ((f2 + F1 * F1) * Math.sqrt((f2 + F2 * F2) * (f2 + F3 * F3)) * (f2 + F4 * F4));
}
const RA_1000 = ra(1000);

/**
 * A-weighting as a linear amplitude gain, normalised to exactly 1 at 1 kHz.
 * @param frequencyHz f ≥ 0
 * @throws RangeError on a negative or non-finite frequency
 * @see IEC 61672-1:2013, annex E, equations (E.6) and (E.1): the analytic A-weighting
 */
export function aWeightingGain(frequencyHz: number): number {
  // NOTE: called once per FFT bin; the message is only built on failure.
  if (!(Number.isFinite(frequencyHz) && frequencyHz >= 0)) precondition(false, 'aWeightingGain', `frequencyHz must be a finite number ≥ 0 (got ${frequencyHz})`);
  return ra(frequencyHz) / RA_1000;
}

/**
 * A-weighting in dB, 20·log10 of `aWeightingGain` (0 dB at 1 kHz, −∞ at DC).
 * @throws RangeError on a negative or non-finite frequency
 * @see IEC 61672-1:2013, annex E
 */
export function aWeightingDb(frequencyHz: number): number {
  return 20 * Math.log10(aWeightingGain(frequencyHz));
}
