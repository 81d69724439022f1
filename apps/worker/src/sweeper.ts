import { QUEUES } from '@earmark/contracts';
import type { MikroORM } from '@mikro-orm/postgresql';
import type { Logger } from 'pino';
import { expireWaivers, type JobProducer, type RecordDeps } from '@earmark/domain';
import { judgeAbandoned } from './jobs/abandon-capture.js';
import type { JudgingMetrics } from './worker-metrics.js';

export interface SweepDeps {
  orm: MikroORM;
  jobs: JobProducer;
  logger: Logger;
  links: RecordDeps;
  /** Counts the `error` verdicts of captures judged abandoned here. */
  judging?: JudgingMetrics;
  /** A queued capture without a job is re-queued once it is this old. */
  queuedAfterSeconds: number;
  /** EARMARK_ANALYSIS_EXPIRE_S: an analysing capture without a job is re-queued once this old. */
  analysisExpireSeconds: number;
}

/** A capture that is this many analysis expiries old and still has no verdict is judged `error`. */
export const ABANDON_AFTER_EXPIRIES = 10;

// No job for the capture that is still to run or running (its analysis, or its dead-letter job).
const NO_LIVE_JOB = `not exists (select 1 from pgboss.job j
                         where j.name in (?, ?) and j.data->>'captureId' = c.id::text and j.state < 'completed')`;
const JOB_QUEUES = [QUEUES.analyzeCapture, `${QUEUES.analyzeCapture}.dead`];

/**
 * Safety net for the outbox pattern: captures whose job was never queued (the API could
 * not reach the queue), got lost, or ended without a verdict (expired, failed, a dead-letter
 * handler that kept failing) are queued again; one still without a verdict after
 * ABANDON_AFTER_EXPIRIES analysis expiries is judged `error`, so every capture ends in a verdict.
 * Re-queuing is harmless because verdicts are unique per capture and revision. Waivers past
 * their date expire here too, and due mail still pending wakes the mail sender.
 * The age is the capture's upload time: an analysing capture with no live job is stuck however
 * long it queued first.
 */
export async function sweep(deps: SweepDeps): Promise<void> {
  const { orm, jobs, logger } = deps;
  const conn = orm.em.fork().getConnection();

  const abandoned = await conn.execute<{ id: string }[]>(
    `select c.id from capture c
      where c.status in ('queued', 'analysing') and c.created_at < now() - make_interval(secs => ?)
        and ${NO_LIVE_JOB}
      limit 100`,
    [deps.analysisExpireSeconds * ABANDON_AFTER_EXPIRIES, ...JOB_QUEUES],
  );
  for (const { id } of abandoned) {
    // One capture that cannot even be judged must not keep the others from their verdict.
    await judgeAbandoned(orm, id, 'Analysis abandoned: no verdict could be reached after repeated attempts.', deps)
      .catch((error: unknown) => logger.error({ err: error, captureId: id }, 'could not judge an abandoned capture'));
  }
  if (abandoned.length) logger.error({ count: abandoned.length }, 'judged error: captures that never reached a verdict');

  const orphans = await conn.execute<{ id: string }[]>(
    `select c.id from capture c
      where ((c.status = 'queued' and c.created_at < now() - make_interval(secs => ?))
          or (c.status = 'analysing' and c.created_at < now() - make_interval(secs => ?)))
        and ${NO_LIVE_JOB}
      limit 100`,
    [deps.queuedAfterSeconds, deps.analysisExpireSeconds, ...JOB_QUEUES],
  );
  for (const { id } of orphans) await jobs.analyzeCapture({ captureId: id });
  if (orphans.length) logger.warn({ count: orphans.length }, 're-queued captures without an analysis job');

  const expired = await expireWaivers(orm.em.fork());
  if (expired) logger.info({ count: expired }, 'waivers expired; findings re-opened');

  const [pending] = await conn.execute<{ n: string }[]>(`select count(*) as n from notification
      where state = 'pending' and (next_attempt_at is null or next_attempt_at <= now())`);
  const waiting = await conn.execute<{ n: string }[]>(
    `select count(*) as n from pgboss.job where name = ? and state < 'completed'`,
    [QUEUES.sendNotifications],
  );
  if (Number(pending?.n ?? 0) > 0 && Number(waiting[0]?.n ?? 0) === 0) await jobs.sendMail('sweep');
}
