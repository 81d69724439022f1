/**
 * How Earmark writes every measured number, on every surface: web, API text (problem details,
 * verdict reasons, finding titles, JUnit XML), mail and the CLI. One rule per quantity:
 *
 * | quantity                   | rule                                               | examples                       |
 * |----------------------------|----------------------------------------------------|--------------------------------|
 * | any negative number        | real minus sign U+2212; a value rounding to 0 has no sign | "−0.83", "0.00"          |
 * | frequency                  | 3 significant digits, trailing zeros dropped; Hz below 1 kHz, kHz from 1 kHz (after rounding) | "31.5 Hz", "999 Hz", "1 kHz", "7.99 kHz", "20 kHz" |
 * | decibels (dB)              | 2 decimals                                         | "−0.83 dB", "12.00 dB"         |
 * | level (dBFS)               | 2 decimals                                         | "−20.00 dBFS"                  |
 * | margin                     | signed ("+" inside, "−" outside) in the check's unit, except that a margin of a dBFS check is a difference in dB | "−0.83 dB", "+1.20 dB" |
 * | percent                    | 3 significant digits, space before %               | "0.042 %", "12.5 %"            |
 * | milliseconds               | 3 decimals                                         | "1.250 ms"                     |
 * | seconds (durations)        | 2 decimals                                         | "0.25 s", "5.00 s"             |
 * | degrees                    | 1 decimal, no space                                | "12.3°"                        |
 * | count (events, samples)    | whole number, no separators, no unit word          | "79153", "−79153"             |
 * | ratio, full scale (FS)     | 3 significant digits; ×10ⁿ below 0.001 or from 10⁶ | "0.95", "1.20×10⁻⁵ FS"         |
 * | failure location           | margin "at" frequency                              | "−0.83 dB at 7.99 kHz"         |
 * | absent, NaN or ±Infinity   | an em dash                                         | "—"                            |
 *
 * Rounding is half away from zero on the decimal value (9.995 dB → "10.00 dB"). Counts that are not
 * measurements (rows, builds in a list) are not covered here.
 */
import { DASH, fixed, roundAbsSignificant, scientific, significant } from './rounding.js';

/** The units checks report in (CheckUnit in masks.ts), plus the units people are shown elsewhere. */
export type QuantityUnit = 'dB' | 'dBFS' | 'deg' | 'ms' | 's' | '%' | 'count' | 'FS' | 'ratio';

type Maybe = number | null | undefined;

const isShowable = (value: Maybe): value is number => typeof value === 'number' && Number.isFinite(value);

/** "7.99 kHz", "999 Hz", "1 kHz" (999.6 Hz rounds to 1 kHz), "31.5 Hz"; "—" when absent. */
export function formatFrequency(hz: Maybe): string {
  if (!isShowable(hz)) return DASH;
  // Decide the unit on the rounded value, so 999.6 Hz reads "1 kHz" and never "1000 Hz".
  if (roundAbsSignificant(hz, 3) >= 1000) return `${significant(hz / 1000, 3)} kHz`;
  return `${significant(hz, 3)} Hz`;
}

/** The number alone, in the unit's rule (no unit word): the figure in a table column. */
export function formatNumberIn(value: Maybe, unit: string | null, signed = false): string {
  if (!isShowable(value)) return DASH;
  switch (unit) {
    case 'dB':
    case 'dBFS':
      return fixed(value, 2, signed);
    case 'ms':
      return fixed(value, 3, signed);
    case 's':
      return fixed(value, 2, signed);
    case 'deg':
      return fixed(value, 1, signed);
    case 'count':
      return fixed(value, 0, signed);
    case 'ratio':
    case 'FS': {
      const magnitude = Math.abs(value);
      return magnitude !== 0 && (magnitude < 1e-3 || magnitude >= 1e6) ? scientific(value, signed) : significant(value, 3, signed);
    }
    default:
      // '%' and any unit not listed: three significant digits.
      return significant(value, 3, signed);
  }
}

function unitSuffix(unit: string | null): string {
  if (unit === null || unit === 'count' || unit === 'ratio') return '';
  if (unit === 'deg') return '°';
  return ` ${unit}`;
}

/** A measured value or limit in its unit: "−20.00 dBFS", "0.042 %", "12.3°", "79153"; "—" when absent. */
export function formatQuantity(value: Maybe, unit: string | null): string {
  if (!isShowable(value)) return DASH;
  return `${formatNumberIn(value, unit)}${unitSuffix(unit)}`;
}

/** The unit a margin is in: a difference between two dBFS levels is in dB. */
export function marginUnit(unit: string | null): string | null {
  return unit === 'dBFS' ? 'dB' : unit;
}

/** A margin, always signed (positive inside the limit): "−0.83 dB", "+1.20 dB", "−79153"; "—" when absent. */
export function formatMargin(value: Maybe, unit: string | null): string {
  if (!isShowable(value)) return DASH;
  const shown = marginUnit(unit);
  return `${formatNumberIn(value, shown, true)}${unitSuffix(shown)}`;
}

/** Where a check fails and by how much: "−0.83 dB at 7.99 kHz", or the margin alone without a frequency. */
export function formatMarginAt(margin: Maybe, unit: string | null, worstHz: Maybe): string {
  const text = formatMargin(margin, unit);
  return isShowable(worstHz) ? `${text} at ${formatFrequency(worstHz)}` : text;
}

/** "−0.83 dB" (2 decimals). */
export const formatDecibels = (db: Maybe): string => formatQuantity(db, 'dB');
/** "−20.00 dBFS" (2 decimals). */
export const formatLevel = (dbfs: Maybe): string => formatQuantity(dbfs, 'dBFS');
/** "0.042 %" (3 significant digits). */
export const formatPercent = (percent: Maybe): string => formatQuantity(percent, '%');
/** "1.250 ms" (3 decimals). */
export const formatMilliseconds = (ms: Maybe): string => formatQuantity(ms, 'ms');
/** "0.25 s" (2 decimals). */
export const formatSeconds = (s: Maybe): string => formatQuantity(s, 's');
/** "12.3°" (1 decimal). */
export const formatDegrees = (deg: Maybe): string => formatQuantity(deg, 'deg');
/** "79153" (a whole number of events or samples). */
export const formatEventCount = (count: Maybe): string => formatQuantity(count, 'count');

/** What a check result carries that people read. */
export interface CheckValues {
  measured: number | null;
  limit: number | null;
  margin: number | null;
  unit: string | null;
  worstHz: number | null;
}

/**
 * A check's numbers in one phrase, the same in finding titles, JUnit, mail and the CLI:
 * "measured 2.04 dB, limit 1.00 dB, margin −1.04 dB at 8.02 kHz". Absent parts are left out.
 */
export function describeCheckValues(check: CheckValues): string {
  const parts = [
    isShowable(check.measured) ? `measured ${formatQuantity(check.measured, check.unit)}` : null,
    isShowable(check.limit) ? `limit ${formatQuantity(check.limit, check.unit)}` : null,
    isShowable(check.margin) ? `margin ${formatMarginAt(check.margin, check.unit, check.worstHz)}` : isShowable(check.worstHz) ? `worst at ${formatFrequency(check.worstHz)}` : null,
  ].filter((part): part is string => part !== null);
  return parts.length > 0 ? parts.join(', ') : 'no values';
}
