import { QUEUES, type ReadinessCheckName, type ReadyReport } from '@earmark/contracts';
import type PgBoss from 'pg-boss';
import type { ObjectStore } from '../object-store/object-store.js';
import { withDeadline } from './deadline.js';

/** Runs one SQL statement on the process's database connection (the ORM's, in our processes). */
export type RunSql = <Row = Record<string, unknown>>(sql: string, params?: unknown[]) => Promise<Row[]>;

/** One probe per dependency; each resolves when the dependency answers and throws otherwise. */
export type ReadinessChecks = Record<ReadinessCheckName, () => Promise<unknown>>;

/** Set by the entry point when shutdown begins; readiness then answers 503 at once. */
export interface Lifecycle {
  draining: boolean;
}

/** What both probe endpoints (the metrics port and the API's own) answer from. */
export interface HealthProbes {
  /** True while the process can serve at all; a draining process is still live (it is finishing its work). */
  live(): boolean;
  ready(): Promise<ReadyReport>;
}

/** Each check gets this long before it counts as failed, so a probe answers within about this time. */
export const READINESS_CHECK_TIMEOUT_MS = 2_000;

/**
 * The checks every Earmark process needs: the database through its own connection, pg-boss
 * (its own pool) reading the analysis queue, and the object store's bucket.
 */
export function dependencyChecks(deps: { sql: RunSql; boss: PgBoss; objectStore: ObjectStore }): ReadinessChecks {
  return {
    database: () => deps.sql('select 1'),
    queue: async () => {
      if (!(await deps.boss.getQueue(QUEUES.analyzeCapture))) throw new Error(`queue ${QUEUES.analyzeCapture} does not exist`);
    },
    objectStore: () => deps.objectStore.ping(),
  };
}

/** Runs every check at once, each bounded by `timeoutMs`; a draining process is not ready whatever they say. */
export async function checkReadiness(checks: ReadinessChecks, opts: { draining: boolean; timeoutMs?: number }): Promise<ReadyReport> {
  if (opts.draining) return { ready: false, draining: true, checks: {}, errors: {} };
  const timeoutMs = opts.timeoutMs ?? READINESS_CHECK_TIMEOUT_MS;
  const outcomes = await Promise.all(
    (Object.entries(checks) as [ReadinessCheckName, () => Promise<unknown>][]).map(async ([name, check]) => {
      try {
        await withDeadline(check(), timeoutMs, name);
        return { name, error: null };
      } catch (error) {
        return { name, error: error instanceof Error ? error.message : String(error) };
      }
    }),
  );
  const report: ReadyReport = { ready: true, draining: false, checks: {}, errors: {} };
  for (const { name, error } of outcomes) {
    report.checks[name] = error === null ? 'ok' : 'failed';
    if (error !== null) {
      report.ready = false;
      report.errors[name] = error;
    }
  }
  return report;
}

/** The probes of a process with these checks: live while it runs, ready while every check passes and it is not draining. */
export function healthProbes(checks: ReadinessChecks, lifecycle: Lifecycle, timeoutMs?: number): HealthProbes {
  return {
    live: () => true,
    ready: () => checkReadiness(checks, { draining: lifecycle.draining, timeoutMs }),
  };
}
