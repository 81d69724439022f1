import { limitAt, type CapturePlot, type LimitPoint } from '@earmark/contracts';
import type { FrequencyRange } from '@/lib/plot/log-frequency';

/**
 * Turns the API's CapturePlot into the column arrays uPlot draws, and computes the
 * geometry the plots paint themselves (failing regions, the allowed zone between the
 * limits, the y range). Pure functions, so they are tested without a canvas.
 */

type Nullable = (number | null)[];

/** x = column frequency; the measured and (optionally) the last-pass curve as min/max pairs. */
export type SpectrumColumns = {
  hz: number[];
  max: Nullable;
  min: Nullable;
  overlayMax: Nullable | null;
  overlayMin: Nullable | null;
  /** Where there is anything to look at: the measured columns' span. */
  domain: FrequencyRange | null;
};

/** Series order in the aligned data handed to uPlot. */
export const SPECTRUM_SERIES = { max: 1, min: 2, overlayMax: 3, overlayMin: 4 } as const;

/** Index of the column whose frequency is nearest to hz on a log axis (hz sorted ascending). */
export function nearestColumn(hz: readonly number[], target: number): number {
  let lo = 0;
  let hi = hz.length - 1;
  if (hi < 0) return -1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if ((hz[mid] as number) <= target) lo = mid;
    else hi = mid;
  }
  const a = hz[lo] as number;
  const b = hz[hi] as number;
  return Math.abs(Math.log(target / a)) <= Math.abs(Math.log(b / target)) ? lo : hi;
}

/**
 * Puts another curve's min/max columns onto these columns (nearest column on log f, keeping
 * the extremes), so the last passing capture lines up even if it was decimated differently.
 */
export function alignToColumns(columns: readonly number[], other: CapturePlot['spectrum']): { min: Nullable; max: Nullable } {
  const min: Nullable = new Array<number | null>(columns.length).fill(null);
  const max: Nullable = new Array<number | null>(columns.length).fill(null);
  const first = columns[0];
  const last = columns[columns.length - 1];
  if (first === undefined || last === undefined) return { min, max };
  for (let i = 0; i < other.hz.length; i++) {
    const hz = other.hz[i] as number;
    if (!(hz > 0) || hz < first / 1.01 || hz > last * 1.01) continue;
    const c = nearestColumn(columns, hz);
    const lo = other.min[i] ?? null;
    const hi = other.max[i] ?? null;
    if (lo !== null) min[c] = min[c] === null ? lo : Math.min(min[c] as number, lo);
    if (hi !== null) max[c] = max[c] === null ? hi : Math.max(max[c] as number, hi);
  }
  return { min, max };
}

function sameColumns(a: readonly number[], b: readonly number[]): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (Math.abs((a[i] as number) - (b[i] as number)) > 1e-9 * (a[i] as number)) return false;
  return true;
}

/** The spectrum as uPlot columns; columns at 0 Hz or below are dropped (a log axis has no place for them). */
export function spectrumColumns(plot: Pick<CapturePlot, 'spectrum' | 'overlay'>): SpectrumColumns {
  const hz: number[] = [];
  const max: Nullable = [];
  const min: Nullable = [];
  const keep: number[] = [];
  const { spectrum } = plot;
  for (let i = 0; i < spectrum.hz.length; i++) {
    const f = spectrum.hz[i] as number;
    if (!(f > 0)) continue;
    keep.push(i);
    hz.push(f);
    max.push(spectrum.max[i] ?? null);
    min.push(spectrum.min[i] ?? null);
  }

  let overlayMax: Nullable | null = null;
  let overlayMin: Nullable | null = null;
  if (plot.overlay) {
    const other = plot.overlay.spectrum;
    if (sameColumns(spectrum.hz, other.hz)) {
      overlayMax = keep.map((i) => other.max[i] ?? null);
      overlayMin = keep.map((i) => other.min[i] ?? null);
    } else {
      const aligned = alignToColumns(hz, other);
      overlayMax = aligned.max;
      overlayMin = aligned.min;
    }
  }

  const first = hz[0];
  const last = hz[hz.length - 1];
  const domain = first !== undefined && last !== undefined && last > first ? { min: first, max: last } : null;
  return { hz, max, min, overlayMax, overlayMin, domain };
}

/**
 * Failing regions clipped to the visible range, sorted, with touching or overlapping ones
 * merged (two checks may flag the same band), so each is shaded exactly once.
 */
export function failingSpans(
  regions: CapturePlot['failingRegions'],
  visible: FrequencyRange,
): { fromHz: number; toHz: number }[] {
  const clipped = regions
    .map((r) => ({ fromHz: Math.max(Math.min(r.fromHz, r.toHz), visible.min), toHz: Math.min(Math.max(r.fromHz, r.toHz), visible.max) }))
    .filter((r) => r.toHz >= r.fromHz)
    .sort((a, b) => a.fromHz - b.fromHz);
  const merged: { fromHz: number; toHz: number }[] = [];
  for (const span of clipped) {
    const last = merged[merged.length - 1];
    if (last && span.fromHz <= last.toHz) last.toHz = Math.max(last.toHz, span.toHz);
    else merged.push({ ...span });
  }
  return merged;
}

/**
 * Corners of the zone between the lower and upper limit where both apply. Both limits are
 * straight on a log axis between their own breakpoints, so evaluating them at the union of
 * breakpoints gives the exact outline.
 */
export function allowedZone(upper: readonly LimitPoint[] | null, lower: readonly LimitPoint[] | null): { hz: number; upper: number; lower: number }[] {
  if (!upper || !lower || upper.length < 2 || lower.length < 2) return [];
  const from = Math.max((upper[0] as LimitPoint).hz, (lower[0] as LimitPoint).hz);
  const to = Math.min((upper[upper.length - 1] as LimitPoint).hz, (lower[lower.length - 1] as LimitPoint).hz);
  if (!(to > from)) return [];
  const hzs = [...new Set([from, to, ...upper.map((p) => p.hz), ...lower.map((p) => p.hz)])]
    .filter((hz) => hz >= from && hz <= to)
    .sort((a, b) => a - b);
  return hzs.map((hz) => ({ hz, upper: limitAt(upper, hz) as number, lower: limitAt(lower, hz) as number }));
}

/** Limit value at a frequency, or null where the limit does not apply (or there is none). */
export function limitValueAt(curve: readonly LimitPoint[] | null, hz: number): number | null {
  return curve ? limitAt(curve, hz) : null;
}

/** Where the mask applies: from the first to the last breakpoint of either limit (or band edge); null without limits. */
export function limitSpan(plot: Pick<CapturePlot, 'upper' | 'lower'> & Partial<Pick<CapturePlot, 'bands'>>): FrequencyRange | null {
  const hzs = [...(plot.upper ?? []), ...(plot.lower ?? [])].map((p) => p.hz);
  for (const b of plot.bands ?? []) hzs.push(b.lowerHz, b.upperHz);
  if (hzs.length < 2) return null;
  return { min: Math.min(...hzs), max: Math.max(...hzs) };
}

/**
 * The dB range to show for the visible frequencies: the measured (and compared) curve, the
 * limits where they apply and the worst point, padded so nothing sits on the frame. Where a
 * mask applies only the judged band sets the range, so a steep roll-off outside it does not
 * squash the part that passed or failed into a few pixels (it runs off the frame instead).
 */
export function spectrumYRange(
  columns: SpectrumColumns,
  plot: Pick<CapturePlot, 'upper' | 'lower' | 'worst'> & Partial<Pick<CapturePlot, 'bands'>>,
  visible: FrequencyRange,
  includeOverlay: boolean,
): { min: number; max: number } {
  const span = limitSpan(plot);
  const judged = span ? { min: Math.max(visible.min, span.min), max: Math.min(visible.max, span.max) } : visible;
  const window = judged.max > judged.min ? judged : visible;
  let lo = Infinity;
  let hi = -Infinity;
  const take = (value: number | null | undefined) => {
    if (value === null || value === undefined || !Number.isFinite(value) || value <= -300) return;
    if (value < lo) lo = value;
    if (value > hi) hi = value;
  };
  for (let i = 0; i < columns.hz.length; i++) {
    const hz = columns.hz[i] as number;
    if (hz < window.min || hz > window.max) continue;
    take(columns.min[i]);
    take(columns.max[i]);
    if (includeOverlay) {
      take(columns.overlayMin?.[i]);
      take(columns.overlayMax?.[i]);
    }
  }
  for (const curve of [plot.upper, plot.lower]) {
    if (!curve) continue;
    for (const p of curve) if (p.hz >= visible.min && p.hz <= visible.max) take(p.db);
    take(limitAt(curve, visible.min));
    take(limitAt(curve, visible.max));
  }
  for (const b of plot.bands ?? []) {
    if (b.upperHz < visible.min || b.lowerHz > visible.max) continue;
    take(b.measured);
    take(b.min);
    take(b.max);
  }
  if (plot.worst && plot.worst.hz >= visible.min && plot.worst.hz <= visible.max) take(plot.worst.db);
  if (!Number.isFinite(lo)) return { min: -60, max: 6 };
  const height = Math.max(hi - lo, 2);
  const pad = height * 0.12;
  return { min: Math.floor(lo - pad), max: Math.ceil(hi + pad) };
}

/** Phase and group delay on their own frequency columns; non-positive frequencies dropped. */
export function responseColumns(series: { hz: number[]; values: number[] } | null): { hz: number[]; values: number[] } | null {
  if (!series) return null;
  const hz: number[] = [];
  const values: number[] = [];
  for (let i = 0; i < series.hz.length; i++) {
    const f = series.hz[i] as number;
    const v = series.values[i];
    if (!(f > 0) || v === undefined || !Number.isFinite(v)) continue;
    hz.push(f);
    values.push(v);
  }
  return hz.length >= 2 ? { hz, values } : null;
}

/** The waveform's y range: always the ±1 full-scale lines, more when the capture goes past them. */
export function waveformYRange(waveform: CapturePlot['waveform']): { min: number; max: number } {
  let lo = -1;
  let hi = 1;
  for (const v of waveform.min) if (v < lo) lo = v;
  for (const v of waveform.max) if (v > hi) hi = v;
  return { min: lo * 1.08, max: hi * 1.08 };
}

/** The number of plot columns to ask for: about one per device pixel, in steps so resizing rarely refetches. */
export function columnsForWidth(cssWidth: number, devicePixelRatio = 1): number {
  const pixels = Math.round(cssWidth * Math.max(1, devicePixelRatio));
  const stepped = Math.ceil(pixels / 256) * 256;
  return Math.min(4096, Math.max(256, stepped));
}
