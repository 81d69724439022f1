import type { EntityManager } from '@mikro-orm/postgresql';
import { Verdict, type Capture } from '@earmark/db';

/**
 * "The newest verdict of a capture", written once. A capture judged again (a newer revision,
 * engine or waiver) keeps its older verdicts for the record; the newest one is what every
 * surface shows and what the build's status is computed from.
 */

/** SQL: the newest verdict's `column` for the capture whose id is `captureIdSql` (a correlated sub-select). */
export const newestVerdictSql = (captureIdSql: string, column: 'outcome' | 'id' | 'waiver_basis' = 'outcome') =>
  `(select v.${column} from verdict v where v.capture_id = ${captureIdSql} order by v.created_at desc, v.id desc limit 1)`;

/** SQL: a CTE body selecting the newest verdict (id, capture_id, mask_revision_id) of each capture in `capturesSql` (a relation with an `id`). */
export const newestVerdictsCte = (capturesSql: string) =>
  `select distinct on (v.capture_id) v.id, v.capture_id, v.mask_revision_id
     from verdict v join ${capturesSql} on ${capturesSql}.id = v.capture_id
    order by v.capture_id, v.created_at desc, v.id desc`;

/** The newest verdict of one capture, or null before its first. */
export function newestVerdict(em: EntityManager, capture: Capture | string, populate: readonly ('maskRevision' | 'previous')[] = []): Promise<Verdict | null> {
  return em.findOne(Verdict, { capture }, { populate: populate as never, orderBy: { createdAt: 'desc', id: 'desc' } });
}

/** The newest verdict of each capture, by capture id (in one query). */
export async function newestVerdicts(
  em: EntityManager,
  captureIds: readonly string[],
  populate: readonly string[] = ['maskRevision'],
): Promise<Map<string, Verdict>> {
  if (captureIds.length === 0) return new Map();
  const verdicts = await em.find(Verdict, { capture: { $in: [...captureIds] } }, { populate: populate as never, orderBy: { createdAt: 'desc', id: 'desc' } });
  const newest = new Map<string, Verdict>();
  for (const v of verdicts) if (!newest.has(v.capture.id)) newest.set(v.capture.id, v);
  return newest;
}
