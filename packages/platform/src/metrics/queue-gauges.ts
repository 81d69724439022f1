import type { Registry } from 'prom-client';
import type { RunSql } from './readiness.js';
import { registerScrapeGauge } from './scrape-gauge.js';

const SAME_FROM_EVERY_PROCESS = 'Read from the database at scrape time: the same value from every process (take max, not sum).';

// Every queue of ours that pg-boss knows (not its own internal ones), with a zero for each state
// that has no job, so a quiet queue still has series.
const DEPTH_SQL = `
  with live as (
    select name, state::text as state, count(*)::float8 as jobs
      from pgboss.job where state < 'completed' group by name, state
  )
  select q.name as queue, s.state, coalesce(l.jobs, 0) as jobs
    from pgboss.queue q
    cross join (values ('created'), ('retry'), ('active')) as s(state)
    left join live l on l.name = q.name and l.state = s.state
   where not starts_with(q.name, '__pgboss__')`;

const OLDEST_SQL = `
  select q.name as queue, coalesce(extract(epoch from now() - min(j.created_on)), 0)::float8 as seconds
    from pgboss.queue q
    left join pgboss.job j on j.name = q.name and j.state < 'active'
   where not starts_with(q.name, '__pgboss__')
   group by q.name`;

/**
 * The job queue as pg-boss holds it: jobs waiting (created), waiting to retry and running per
 * queue, and how long the oldest waiting job has waited.
 */
export function registerQueueGauges(registry: Registry, sql: RunSql, timeoutMs?: number): void {
  registerScrapeGauge(registry, {
    name: 'earmark_queue_depth',
    help: `Jobs per queue and state (created: waiting, retry: waiting to retry, active: running). ${SAME_FROM_EVERY_PROCESS}`,
    labelNames: ['queue', 'state'],
    timeoutMs,
    read: async () => (await sql<{ queue: string; state: string; jobs: number }>(DEPTH_SQL)).map((r) => ({ labels: { queue: r.queue, state: r.state }, value: Number(r.jobs) })),
  });
  registerScrapeGauge(registry, {
    name: 'earmark_queue_oldest_age_seconds',
    help: `Age of the oldest job of the queue still waiting (created or retry), 0 when none waits. ${SAME_FROM_EVERY_PROCESS}`,
    labelNames: ['queue'],
    timeoutMs,
    read: async () => (await sql<{ queue: string; seconds: number }>(OLDEST_SQL)).map((r) => ({ labels: { queue: r.queue }, value: Number(r.seconds) })),
  });
}
