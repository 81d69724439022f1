/**
 * "Since which build" and "how often", read from a check's history on one branch (pure).
 *
 * A history is the outcome of one check in the newest capture of one test case × target, one point
 * per build that captured that cell, oldest build first. Builds that did not capture the cell, or
 * whose verdict had no result for the check (an analysis error), have no point: they neither
 * extend nor break a streak.
 */

export interface CheckOutcomeAt {
  sha: string;
  /** The build's creation time (ISO string or Date): the order of the history. */
  createdAt: string | Date;
  pass: boolean;
}

export interface FailingStreak<P extends CheckOutcomeAt> {
  /** The first build of the streak. */
  since: P;
  /** The newest point (failing). */
  latest: P;
  /** Builds in the streak. */
  length: number;
}

const time = (p: CheckOutcomeAt) => new Date(p.createdAt).getTime();

/** Oldest first by build time; ties keep their given order. */
function chronological<P extends CheckOutcomeAt>(points: readonly P[]): P[] {
  return points
    .map((p, i) => ({ p, i }))
    .sort((a, b) => time(a.p) - time(b.p) || a.i - b.i)
    .map(({ p }) => p);
}

/**
 * The current failing streak: walking back from the newest point while the check fails. Null when
 * the newest point passes (it is not failing now) or there is no point.
 */
export function currentFailingStreak<P extends CheckOutcomeAt>(points: readonly P[]): FailingStreak<P> | null {
  const ordered = chronological(points);
  const latest = ordered.at(-1);
  if (!latest || latest.pass) return null;
  let start = ordered.length - 1;
  while (start > 0 && !ordered[start - 1]!.pass) start -= 1;
  return { since: ordered[start]!, latest, length: ordered.length - start };
}

export interface FindingHistory<P extends CheckOutcomeAt> {
  /** The first failing build after `after` (the finding's first sighting); null when none. */
  firstSeen: P | null;
  /** Failing builds after `after`, passes in between included or not. */
  occurrences: number;
  /** The first build of the failing streak the history ends in; null when the newest point passes. */
  failingSince: P | null;
}

/**
 * A finding's history: it lives from its first failing build after `after` — the moment an
 * earlier finding of the same check was closed (fixed, not a defect), or the beginning — and every
 * failing build since counts once, passing builds in between included (a finding stays open through
 * an intermittent pass until a person closes it).
 */
export function findingHistory<P extends CheckOutcomeAt>(points: readonly P[], after: Date | null = null): FindingHistory<P> {
  const ordered = chronological(points).filter((p) => after === null || time(p) > after.getTime());
  const failing = ordered.filter((p) => !p.pass);
  return { firstSeen: failing[0] ?? null, occurrences: failing.length, failingSince: currentFailingStreak(ordered)?.since ?? null };
}
