/**
 * Log-frequency helpers shared by every frequency plot (capture spectra, mask previews):
 * readable Hz labels, tick positions on a log axis, and zoom arithmetic in log frequency.
 */

import { formatFrequency } from '@earmark/contracts';

export type FrequencyRange = { min: number; max: number };

const MINUS = '\u2212';

/** Up to `digits` significant digits without trailing zeros ("8.02", "20", "31.5"). */
function significant(value: number, digits: number): string {
  if (!Number.isFinite(value)) return String(value);
  const text = Math.abs(value) >= 10 ** digits ? Math.round(value).toString() : value.toPrecision(digits);
  return text.includes('.') && !text.includes('e') ? text.replace(/\.?0+$/, '') : text;
}

/** "8.02 kHz", "997 Hz", "31.5 Hz", "20 kHz": a measured frequency, in the one rule of @earmark/contracts. */
export const formatHz = (hz: number): string => formatFrequency(hz);

/** Compact tick label: "20", "500", "1k", "2.5k", "20k". */
export function formatHzTick(hz: number): string {
  if (hz >= 1000) return `${significant(hz / 1000, 3)}k`;
  return significant(hz, 3);
}

/** A value rounded to 1, 2 or 5 times a power of ten, at least `raw`. */
function niceStep(raw: number): number {
  const power = 10 ** Math.floor(Math.log10(raw));
  const fraction = raw / power;
  const nice = fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 5 ? 5 : 10;
  return nice * power;
}

/**
 * Tick positions for a log-frequency axis between min and max (Hz): 1-2-5 per decade over
 * a wide span, every integer multiple when zoomed into a decade or so, and evenly spaced
 * ticks when zoomed so far that a decade no longer gives three of them.
 */
export function logFrequencyTicks(min: number, max: number): number[] {
  if (!(min > 0) || !(max > min)) return [];
  const inRange = (mantissas: readonly number[]): number[] => {
    const ticks: number[] = [];
    for (let exp = Math.floor(Math.log10(min)); exp <= Math.ceil(Math.log10(max)); exp++) {
      for (const m of mantissas) {
        // Rounded so 3 × 10^-1 is 0.3 and not 0.30000000000000004.
        const value = Number((m * 10 ** exp).toPrecision(12));
        if (value >= min * (1 - 1e-9) && value <= max * (1 + 1e-9)) ticks.push(value);
      }
    }
    return ticks;
  };
  const coarse = inRange([1, 2, 5]);
  if (coarse.length >= 4) return coarse;
  const fine = inRange([1, 2, 3, 4, 5, 6, 7, 8, 9]);
  if (fine.length >= 3) return fine;
  const step = niceStep((max - min) / 5);
  const ticks: number[] = [];
  for (let value = Math.ceil(min / step) * step; value <= max * (1 + 1e-9); value += step) {
    ticks.push(Number(value.toPrecision(12)));
  }
  return ticks;
}

/** Keeps a range inside the domain, preserving its width on the log axis where it can. */
export function clampLogRange(range: FrequencyRange, domain: FrequencyRange): FrequencyRange {
  const span = Math.log(range.max / range.min);
  const domainSpan = Math.log(domain.max / domain.min);
  if (span >= domainSpan) return { ...domain };
  if (range.min < domain.min) return { min: domain.min, max: domain.min * Math.exp(span) };
  if (range.max > domain.max) return { min: domain.max / Math.exp(span), max: domain.max };
  return range;
}

/**
 * Zooms a log-frequency range by `factor` (< 1 zooms in, > 1 out) about `centerHz`
 * (default: the geometric middle), never past the domain nor narrower than 1/50 octave.
 */
export function zoomLogRange(range: FrequencyRange, factor: number, domain: FrequencyRange, centerHz?: number): FrequencyRange {
  const center = centerHz ?? Math.sqrt(range.min * range.max);
  const lo = Math.log(range.min / center) * factor;
  const hi = Math.log(range.max / center) * factor;
  const minSpan = Math.log(2) / 50;
  const grow = hi - lo < minSpan ? (minSpan - (hi - lo)) / 2 : 0;
  return clampLogRange({ min: center * Math.exp(lo - grow), max: center * Math.exp(hi + grow) }, domain);
}

/** Moves a range by `fraction` of its own width on the log axis (positive = towards higher Hz). */
export function panLogRange(range: FrequencyRange, fraction: number, domain: FrequencyRange): FrequencyRange {
  const shift = Math.exp(Math.log(range.max / range.min) * fraction);
  return clampLogRange({ min: range.min * shift, max: range.max * shift }, domain);
}

/** A window of ±`octaves` around a frequency, for "show me where this check failed". */
export function rangeAround(hz: number, octaves: number, domain: FrequencyRange): FrequencyRange {
  const k = 2 ** octaves;
  return clampLogRange({ min: hz / k, max: hz * k }, domain);
}

/** Signed number with a real minus sign, e.g. "+0.42", "−1.30". */
export function signed(value: number, decimals: number): string {
  const text = Math.abs(value).toFixed(decimals);
  if (Number(text) === 0) return text;
  return `${value < 0 ? MINUS : '+'}${text}`;
}

/** A number with a typographic minus sign and no plus sign. */
export function plain(value: number, decimals: number): string {
  const text = Math.abs(value).toFixed(decimals);
  return value < 0 && Number(text) !== 0 ? `${MINUS}${text}` : text;
}
