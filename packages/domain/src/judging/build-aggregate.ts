import { aggregateBuildStatus, type BuildStatus, type CaptureState } from '@earmark/contracts';
import type { EntityManager } from '@mikro-orm/postgresql';

interface Row {
  status: CaptureState['status'];
  outcome: CaptureState['outcome'];
}

/** The build's status from each capture's status and newest verdict, in one query (inside em's transaction). */
export async function computeBuildStatus(em: EntityManager, buildId: string): Promise<BuildStatus> {
  const rows = await em.getConnection().execute<Row[]>(
    `select c.status,
            (select v.outcome from verdict v where v.capture_id = c.id order by v.created_at desc limit 1) as outcome
       from capture c where c.build_id = ?`,
    [buildId],
    'all',
    // Without the transaction context the query would not see the verdict being written.
    em.getTransactionContext(),
  );
  return aggregateBuildStatus(rows);
}
