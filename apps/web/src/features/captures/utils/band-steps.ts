import type { PlotBand } from '@earmark/contracts';

export type StepPoint = { hz: number; value: number };

/** Bands this close (relative) share an edge: their steps join with a riser. */
const SAME_EDGE = 1e-6;

/**
 * A band-levels check's measured levels or limits as step lines: each band is flat from its
 * lower to its upper edge; adjacent bands join with a vertical riser, and a band without the
 * value (no such limit, or not measured) breaks the line.
 */
export function bandSteps(bands: readonly PlotBand[], key: 'measured' | 'min' | 'max'): StepPoint[][] {
  const lines: StepPoint[][] = [];
  let current: StepPoint[] = [];
  let lastUpper: number | null = null;
  for (const band of [...bands].sort((a, b) => a.lowerHz - b.lowerHz)) {
    const value = band[key];
    const joins = lastUpper !== null && Math.abs(band.lowerHz - lastUpper) <= SAME_EDGE * lastUpper;
    if (value === null || !joins) {
      if (current.length) lines.push(current);
      current = [];
    }
    if (value !== null) current.push({ hz: band.lowerHz, value }, { hz: band.upperHz, value });
    lastUpper = band.upperHz;
  }
  if (current.length) lines.push(current);
  return lines;
}

/** The band a frequency falls in (lower ≤ f < upper), or null between and outside the bands. */
export function bandAt(bands: readonly PlotBand[] | null | undefined, hz: number): PlotBand | null {
  return bands?.find((b) => hz >= b.lowerHz && hz < b.upperHz) ?? null;
}
