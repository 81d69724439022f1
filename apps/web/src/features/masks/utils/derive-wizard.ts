import { formatPercent, type MagnitudeEnvelopeCheck, type MaskCheck, type YieldAtGuard, type YieldEstimate } from '@earmark/contracts';

/** Where a derived envelope goes in the draft: in place of an envelope check (keeping its id), or beside the others. */
export type DerivedPlacement = { mode: 'replace'; checkId: string } | { mode: 'add' };

/** Id of the derived check when it is added: `derived-envelope`, else the first free `derived-envelope-N`. */
export function addedCheckId(existingIds: readonly string[]): string {
  const taken = new Set(existingIds);
  if (!taken.has('derived-envelope')) return 'derived-envelope';
  for (let n = 2; ; n++) if (!taken.has(`derived-envelope-${n}`)) return `derived-envelope-${n}`;
}

/**
 * The derived check as it will sit in the draft: replacing takes over the replaced check's id
 * (findings and history keep following it) at its position; adding gets a free id at the end.
 */
export function placeDerived<T>(checks: readonly T[], derived: MagnitudeEnvelopeCheck, placement: DerivedPlacement, idOf: (c: T) => string, wrap: (c: MagnitudeEnvelopeCheck) => T): T[] {
  if (placement.mode === 'replace') {
    const at = checks.findIndex((c) => idOf(c) === placement.checkId);
    if (at >= 0) return checks.map((c, i) => (i === at ? wrap({ ...derived, id: placement.checkId }) : c));
  }
  return [...checks, wrap({ ...derived, id: addedCheckId(checks.map(idOf)) })];
}

/** For stored checks (a revision the user cannot edit becomes a new unsaved draft). */
export function placeDerivedInChecks(checks: readonly MaskCheck[], derived: MagnitudeEnvelopeCheck, placement: DerivedPlacement): MaskCheck[] {
  return placeDerived<MaskCheck>(checks, derived, placement, (c) => c.id, (c) => c);
}

/** The tabulated estimate at the guard band nearest `guardDb` (the table steps by 0.1 dB). */
export function yieldAtGuard(estimate: YieldEstimate, guardDb: number): YieldAtGuard | null {
  let best: YieldAtGuard | null = null;
  for (const row of estimate.byGuardBandDb) if (best === null || Math.abs(row.guardDb - guardDb) < Math.abs(best.guardDb - guardDb)) best = row;
  return best;
}

/** The largest guard band the estimate is tabulated for, dB (the slider's end). */
export function largestTabulatedGuard(estimate: YieldEstimate | undefined, fallback = 3): number {
  const rows = estimate?.byGuardBandDb ?? [];
  return rows.length ? Math.max(...rows.map((r) => r.guardDb)) : fallback;
}

const percent = (fraction: number) => formatPercent(fraction * 100);

/**
 * "about 2.86 % of good units would fail": the headline is the parametric rate, the one that
 * moves smoothly with the guard band (the leave-one-out rate moves in steps of 1/N, so it cannot
 * follow a slider); it errs on the safe side, and the leave-one-out count with its interval is
 * shown under it as the check (docs/masks.md, "Yield estimate").
 */
export function yieldHeadline(row: YieldAtGuard): string {
  return `about ${percent(row.parametric.rate)} of good units would fail`;
}

/** The two estimators in words, for under the headline. */
export function yieldDetails(row: YieldAtGuard): { leaveOneOut: string | null; parametric: string } {
  const loo = row.leaveOneOut;
  return {
    leaveOneOut: loo ? `Leave-one-out: ${loo.failures} of ${loo.n} left-out captures fail (${percent(loo.rate)}; 95 % interval ${percent(loo.low)} to ${percent(loo.high)})` : null,
    parametric: `Gaussian model per frequency: ${percent(row.parametric.rate)} (between ${percent(row.parametric.correlatedBound)} if all frequencies move together and ${percent(row.parametric.independentBound)} if none do)`,
  };
}
