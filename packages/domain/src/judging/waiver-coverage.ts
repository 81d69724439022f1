import type { VerdictOutcome, WaivedCheckDetails } from '@earmark/contracts';

/**
 * Which failing checks a set of waivers covers and what the verdict then reads — pure, shared
 * by judging a new capture (record-verdict) and re-judging stored verdicts when a waiver is
 * approved, revoked or expires (rejudge-waivers).
 */

/** An active waiver as coverage sees it. `targetId` null: every target of its test case. */
export interface CoveringWaiver {
  id: string;
  checkId: string;
  targetId: string | null;
  expiresAt: Date;
}

/** The little of a check result coverage needs. */
export interface CoverableCheck {
  id: string;
  pass: boolean;
}

/**
 * The failing checks of a capture on `targetId` that `waivers` (already known to be active
 * and of the capture's project and test case) cover: check id → the covering waiver running
 * longest, since its date is the one that matters. Passing checks are never covered.
 */
export function coveredChecks(checks: readonly CoverableCheck[], waivers: readonly CoveringWaiver[], targetId: string): Map<string, CoveringWaiver> {
  const covered = new Map<string, CoveringWaiver>();
  for (const check of checks) {
    if (check.pass) continue;
    for (const w of waivers) {
      if (w.checkId !== check.id || (w.targetId !== null && w.targetId !== targetId)) continue;
      const best = covered.get(check.id);
      if (!best || w.expiresAt > best.expiresAt || (w.expiresAt.getTime() === best.expiresAt.getTime() && w.id < best.id)) covered.set(check.id, w);
    }
  }
  return covered;
}

/**
 * The outcome of a judged capture under the coverage: an `error` or a `pass` stays as it is;
 * a `fail` whose every failing check is covered passes with waiver; otherwise it fails with
 * the analysis' own reason.
 */
export function waivedOutcome(
  judged: { outcome: VerdictOutcome; reason: string | null },
  checks: readonly CoverableCheck[],
  covered: ReadonlyMap<string, CoveringWaiver>,
): { outcome: VerdictOutcome; reason: string | null } {
  if (judged.outcome !== 'fail') return { outcome: judged.outcome, reason: judged.reason };
  const failing = checks.filter((c) => !c.pass);
  if (failing.length > 0 && failing.every((c) => covered.has(c.id))) {
    return { outcome: 'pass', reason: `passed with waiver: ${failing.map((c) => c.id).join(', ')}` };
  }
  return { outcome: 'fail', reason: judged.reason };
}

/** What a covered check stores in `details.waived` (contracts' WaivedCheckDetails). */
export const waivedDetails = (w: CoveringWaiver): WaivedCheckDetails => ({ waiverId: w.id, until: w.expiresAt.toISOString() });

/** A stored check's details with its waiver mark set from the coverage (or removed). */
export function withWaiverMark(details: Record<string, unknown>, checkId: string, covered: ReadonlyMap<string, CoveringWaiver>): Record<string, unknown> {
  const { waived: _previous, ...rest } = details;
  const w = covered.get(checkId);
  return w ? { ...rest, waived: waivedDetails(w) } : rest;
}

/** The waiver mark of stored check details, or null (tolerates rows written by older code). */
export function waiverMarkOf(details: Record<string, unknown>): { id: string; until: string } | null {
  const w = details.waived;
  if (!w || typeof w !== 'object') return null;
  const { waiverId, until } = w as Partial<WaivedCheckDetails>;
  return typeof waiverId === 'string' && typeof until === 'string' ? { id: waiverId, until } : null;
}

/** How a verdict changed by a waiver records why (see Verdict.waiverBasis). */
export type WaiverEvent = { kind: 'approved' | 'revoked' | 'expired'; waiverId: string };

/**
 * The verdict's waiver basis: the ids of the waivers applied, sorted, comma-separated; a
 * verdict re-judged because of a waiver event adds `;<event>=<waiver id>`. Each waiver is
 * approved once and ends once, so a capture never gets two verdicts with one basis under one
 * revision and engine.
 */
export function waiverBasis(covered: ReadonlyMap<string, { id: string }>, event?: WaiverEvent): string {
  const ids = [...new Set([...covered.values()].map((w) => w.id))].sort().join(',');
  return event ? `${ids};${event.kind}=${event.waiverId}` : ids;
}

/** Whether two coverages apply the same waiver to the same checks (then re-judging changes nothing). */
export function sameCoverage(a: ReadonlyMap<string, { id: string }>, b: ReadonlyMap<string, { id: string }>): boolean {
  return a.size === b.size && [...a].every(([checkId, w]) => b.get(checkId)?.id === w.id);
}

/**
 * "Passed with waiver, until <date>" for a verdict: the waiver of its checks that ends first,
 * since the verdict fails again then. Null unless the verdict passes with at least one waived check.
 */
export function verdictWaiver(outcome: VerdictOutcome, marks: readonly ({ id: string; until: string } | null)[]): { id: string; until: string } | null {
  if (outcome !== 'pass') return null;
  let first: { id: string; until: string } | null = null;
  for (const m of marks) if (m && (!first || m.until < first.until)) first = m;
  return first;
}
