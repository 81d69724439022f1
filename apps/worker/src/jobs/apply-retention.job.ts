import { ApplyRetentionJob } from '@earmark/contracts';
import { applyRetention, cleanOrphans, type OrphanResult, type RetentionOptions, type RetentionResult } from '@earmark/domain';
import type { ObjectStore } from '@earmark/platform';
import type { MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import type { WorkerEnv } from '../env.js';

export interface RetentionJobDeps {
  orm: MikroORM;
  objectStore: ObjectStore;
  logger: Logger;
  env: Pick<WorkerEnv, 'EARMARK_RETENTION_PASSED_DAYS' | 'EARMARK_RETENTION_FAILED_DAYS' | 'EARMARK_ORPHAN_GRACE_HOURS'>;
  /** Tests move the clock and shrink batches; production uses the defaults. */
  options?: RetentionOptions;
}

/**
 * The hourly data-lifecycle run (scheduled on `apply-retention`): the retention policy first,
 * then objects no row accounts for. Both are idempotent, so a retried or overlapping run only
 * repeats deletions that are no-ops. The rules live in the domain (packages/domain/src/lifecycle).
 */
export async function applyRetentionJob(job: PgBoss.Job<unknown> | null, deps: RetentionJobDeps): Promise<{ retention: RetentionResult; orphans: OrphanResult }> {
  const { reason } = ApplyRetentionJob.parse(job?.data ?? {});
  const { orm, objectStore, logger, env } = deps;
  const started = performance.now();
  const policy = { passedDays: env.EARMARK_RETENTION_PASSED_DAYS, failedDays: env.EARMARK_RETENTION_FAILED_DAYS };
  const retention = await applyRetention(orm.em, objectStore, logger, policy, deps.options);
  logger.info({ ...retention, ...policy, reason }, 'retention applied: capture audio past its limit purged');
  const orphans = await cleanOrphans(orm.em, objectStore, { graceHours: env.EARMARK_ORPHAN_GRACE_HOURS, now: deps.options?.now });
  logger.info({ ...orphans, graceHours: env.EARMARK_ORPHAN_GRACE_HOURS, ms: Math.round(performance.now() - started) }, 'orphaned objects cleaned up');
  return { retention, orphans };
}
