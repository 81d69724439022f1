/**
 * Fair analysis order across projects. pg-boss fetches the highest `priority` first (then the
 * oldest), so a capture's priority is minus the number of its project's captures queued ahead of
 * it: every project's first waiting capture is 0, its second −1, and so on. One project's backlog
 * of 1,000 therefore delays another project's single capture by at most the analyses already
 * running (one slot time), instead of the whole backlog; projects with backlogs take turns.
 */

/** Re-evaluation (a newer mask revision or engine) is background work: after every fresh capture. */
export const REEVALUATION_PRIORITY = -1_000_000;

/** The priority of a fresh capture with `queuedAhead` of its project's captures waiting before it. */
export function freshCapturePriority(queuedAhead: number): number {
  // Never below re-evaluation, whatever the backlog.
  return queuedAhead > 0 ? Math.max(-queuedAhead, REEVALUATION_PRIORITY + 1) : 0;
}

/**
 * How many captures of the same project wait (status `queued`) ahead of the given one. Served
 * by the partial index `capture_queued_project_idx` (migration 20261202220200).
 */
export const QUEUED_AHEAD_SQL = `
  select count(*)::int as ahead
    from capture me
    join capture c on c.project_id = me.project_id and c.status = 'queued'
                  and (c.created_at, c.id) < (me.created_at, me.id)
   where me.id = $1`;
