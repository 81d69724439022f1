/**
 * Decimal rounding for display. `Number.prototype.toFixed` rounds the binary value, so 9.995
 * (stored as 9.99499…) reads "9.99"; people expect "10.00". Shifting by the exponent in the
 * decimal string form rounds the number as written instead.
 */

export const MINUS = '\u2212';
export const DASH = '—';

/** `n` × 10^k, exact in decimal: the exponent of the string form is shifted (works for "1.2e-7" too). */
function shift(n: number, k: number): number {
  const [mantissa = '0', exponent = '0'] = String(n).split('e');
  return Number(`${mantissa}e${Number(exponent) + k}`);
}

/** |value| rounded half away from zero to `decimals` places. */
export function roundAbs(value: number, decimals: number): number {
  return shift(Math.round(shift(Math.abs(value), decimals)), -decimals);
}

/** |value| rounded to `digits` significant digits (half away from zero). */
export function roundAbsSignificant(value: number, digits: number): number {
  const abs = Math.abs(value);
  if (abs === 0) return 0;
  const decimals = digits - 1 - Math.floor(Math.log10(abs));
  if (decimals >= 0) return roundAbs(abs, decimals);
  const step = 10 ** -decimals;
  return Math.round(abs / step) * step;
}

/** The sign in front of a rounded magnitude: U+2212 for negatives, "+" only when asked; none for zero (−0.004 is "0.00"). */
export function signPrefix(value: number, roundedAbs: number, explicitPlus: boolean): string {
  if (roundedAbs === 0) return '';
  if (value < 0) return MINUS;
  return explicitPlus ? '+' : '';
}

/** `value` to fixed decimals with a real minus sign ("−0.83", "+1.20" with `explicitPlus`). */
export function fixed(value: number, decimals: number, explicitPlus = false): string {
  const rounded = roundAbs(value, decimals);
  return `${signPrefix(value, rounded, explicitPlus)}${rounded.toFixed(decimals)}`;
}

/** Up to `digits` significant digits, trailing zeros dropped ("7.99", "31.5", "20", "0.042"). */
export function significant(value: number, digits: number, explicitPlus = false): string {
  const rounded = roundAbsSignificant(value, digits);
  // Whole numbers of more digits than asked (1234 at 3 digits → 1230) stay plain integers.
  const text = rounded >= 10 ** (digits - 1) ? String(Math.round(rounded)) : trimZeros(rounded.toFixed(Math.max(0, digits - 1 - Math.floor(Math.log10(rounded || 1)))));
  return `${signPrefix(value, rounded, explicitPlus)}${text}`;
}

function trimZeros(text: string): string {
  return text.includes('.') ? text.replace(/\.?0+$/, '') : text;
}

const SUPERSCRIPT = '⁰¹²³⁴⁵⁶⁷⁸⁹';

/** "1.20×10⁻⁵": three significant digits and a power of ten, for ratios far from 1. */
export function scientific(value: number, explicitPlus = false): string {
  const [mantissa = '0', power = '0'] = Math.abs(value).toExponential(2).split('e');
  const exp = Number(power);
  const digits = String(Math.abs(exp))
    .split('')
    .map((d) => SUPERSCRIPT[Number(d)] ?? d)
    .join('');
  return `${signPrefix(value, Math.abs(value), explicitPlus)}${mantissa}×10${exp < 0 ? '⁻' : ''}${digits}`;
}
