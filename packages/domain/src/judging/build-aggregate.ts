import { aggregateBuildStatus, type BuildStatus, type CaptureState } from '@earmark/contracts';
import type { EntityManager } from '@mikro-orm/postgresql';
import { newestVerdictSql } from '../repositories/verdicts.js';

interface Row {
  status: CaptureState['status'];
  outcome: CaptureState['outcome'];
}

/** The build's status from each capture's status and newest verdict, in one query (inside em's transaction). */
export async function computeBuildStatus(em: EntityManager, buildId: string): Promise<BuildStatus> {
  const rows = await em.getConnection().execute<Row[]>(
    `select c.status, ${newestVerdictSql('c.id')} as outcome from capture c where c.build_id = ?`,
    [buildId],
    'all',
    // Without the transaction context the query would not see the verdict being written.
    em.getTransactionContext(),
  );
  return aggregateBuildStatus(rows);
}

/** Recomputes and stores a build's status by the one rule (call inside the transaction that changed a capture or verdict). */
export async function recomputeBuildStatus(em: EntityManager, build: { id: string; status: BuildStatus }): Promise<BuildStatus> {
  build.status = await computeBuildStatus(em, build.id);
  return build.status;
}
