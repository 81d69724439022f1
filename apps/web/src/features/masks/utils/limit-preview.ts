import { limitAt, type CapturePlot, type LimitPoint } from '@earmark/contracts';

/** uPlot columns of the preview: frequency, measured max/min, then the draft's limits at each column. */
export type PreviewColumns = {
  hz: number[];
  max: (number | null)[];
  min: (number | null)[];
  upper: (number | null)[];
  lower: (number | null)[];
};

/** The spectrum's positive-frequency columns with the limits evaluated on them (null where a limit does not apply). */
export function previewColumns(spectrum: CapturePlot['spectrum'], upper: readonly LimitPoint[] | null, lower: readonly LimitPoint[] | null): PreviewColumns {
  const out: PreviewColumns = { hz: [], max: [], min: [], upper: [], lower: [] };
  spectrum.hz.forEach((hz, i) => {
    if (!(hz > 0)) return;
    out.hz.push(hz);
    out.max.push(spectrum.max[i] ?? null);
    out.min.push(spectrum.min[i] ?? null);
    out.upper.push(upper ? limitAt(upper, hz) : null);
    out.lower.push(lower ? limitAt(lower, hz) : null);
  });
  return out;
}

export type PreviewMargin = { hz: number; margin: number; side: 'upper' | 'lower' } | null;

/**
 * The smallest margin of the shown curve against the draft's limits (positive inside), an
 * estimate on the plot's decimated columns: the column extremes are kept, so a narrow peak
 * is not missed, but the engine's own evaluation (smoothing, normalisation) decides.
 */
export function worstPreviewMargin(columns: PreviewColumns): PreviewMargin {
  let worst: PreviewMargin = null;
  columns.hz.forEach((hz, i) => {
    const hi = columns.max[i];
    const lo = columns.min[i];
    const upper = columns.upper[i];
    const lower = columns.lower[i];
    if (upper != null && hi != null && (worst === null || upper - hi < worst.margin)) worst = { hz, margin: upper - hi, side: 'upper' };
    if (lower != null && lo != null && (worst === null || lo - lower < worst.margin)) worst = { hz, margin: lo - lower, side: 'lower' };
  });
  return worst;
}

/** y range covering the curve and the limits, padded. */
export function previewYRange(columns: PreviewColumns): { min: number; max: number } {
  let lo = Infinity;
  let hi = -Infinity;
  for (const series of [columns.max, columns.min, columns.upper, columns.lower]) {
    for (const v of series) {
      if (v == null || !Number.isFinite(v) || v <= -300) continue;
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
  }
  if (!Number.isFinite(lo)) return { min: -60, max: 6 };
  const pad = Math.max(hi - lo, 2) * 0.1;
  return { min: Math.floor(lo - pad), max: Math.ceil(hi + pad) };
}
