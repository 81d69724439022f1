import { limitAt, type CapturePlot, type LimitPoint, type MaskDiff } from '@earmark/contracts';

/** One magnitude envelope as it stands before and after the revision (null where absent on that side). */
export type EnvelopePair = {
  id: string;
  unit: 'dB' | 'dBFS';
  old: { upper: LimitPoint[] | null; lower: LimitPoint[] | null } | null;
  new: { upper: LimitPoint[] | null; lower: LimitPoint[] | null } | null;
};

type EnvelopeLike = { kind?: unknown; measure?: unknown; upper?: unknown; lower?: unknown };

function limits(check: EnvelopeLike | null): EnvelopePair['old'] {
  if (!check || check.kind !== 'magnitude-envelope') return null;
  return { upper: (check.upper as LimitPoint[] | undefined) ?? null, lower: (check.lower as LimitPoint[] | undefined) ?? null };
}

/**
 * The envelopes a review can overlay: every magnitude-envelope check on either side of the
 * diff, changed ones first (they are what the reviewer decides on).
 */
export function envelopePairs(diff: Pick<MaskDiff, 'checks'>): EnvelopePair[] {
  const pairs = diff.checks
    .filter((c) => c.before?.kind === 'magnitude-envelope' || c.after?.kind === 'magnitude-envelope')
    .map((c) => ({
      id: c.id,
      unit: ((c.after ?? c.before)?.measure === 'level' ? 'dBFS' : 'dB') as EnvelopePair['unit'],
      old: limits(c.before as EnvelopeLike | null),
      new: limits(c.after as EnvelopeLike | null),
      changed: c.status !== 'unchanged',
    }));
  return [...pairs.filter((p) => p.changed), ...pairs.filter((p) => !p.changed)].map(({ changed: _changed, ...pair }) => pair);
}

/** uPlot columns: frequency, the capture's max/min, then old upper/lower and new upper/lower at each column. */
export type OverlayColumns = {
  hz: number[];
  max: (number | null)[];
  min: (number | null)[];
  oldUpper: (number | null)[];
  oldLower: (number | null)[];
  newUpper: (number | null)[];
  newLower: (number | null)[];
};

const at = (curve: LimitPoint[] | null | undefined, hz: number) => (curve ? limitAt(curve, hz) : null);

export function overlayColumns(spectrum: CapturePlot['spectrum'], pair: EnvelopePair): OverlayColumns {
  const out: OverlayColumns = { hz: [], max: [], min: [], oldUpper: [], oldLower: [], newUpper: [], newLower: [] };
  spectrum.hz.forEach((hz, i) => {
    if (!(hz > 0)) return;
    out.hz.push(hz);
    out.max.push(spectrum.max[i] ?? null);
    out.min.push(spectrum.min[i] ?? null);
    out.oldUpper.push(at(pair.old?.upper, hz));
    out.oldLower.push(at(pair.old?.lower, hz));
    out.newUpper.push(at(pair.new?.upper, hz));
    out.newLower.push(at(pair.new?.lower, hz));
  });
  return out;
}

/** y range covering the curve and both sets of limits, padded; floor values (≤ −300 dB) ignored. */
export function overlayYRange(columns: OverlayColumns): { min: number; max: number } {
  let lo = Infinity;
  let hi = -Infinity;
  for (const series of [columns.max, columns.min, columns.oldUpper, columns.oldLower, columns.newUpper, columns.newLower]) {
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
