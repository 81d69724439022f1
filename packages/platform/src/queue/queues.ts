import { QUEUES } from '@earmark/contracts';
import type PgBoss from 'pg-boss';

export interface QueueSettings {
  /** Seconds an analysis may run before pg-boss fails it and retries (a killed worker's job). */
  analyzeExpireSeconds?: number;
  /** Seconds before the first retry; doubles with each retry. */
  retryDelaySeconds?: number;
  /** The worker owns queue settings and updates existing queues; producers only create missing ones. */
  updateExisting?: boolean;
}

/**
 * Creates every queue with explicit retry, expiry and dead-letter settings, and brings an
 * existing queue's settings up to date. Run at start-up by every producer and consumer:
 * `send()` to a queue never created returns null.
 */
export async function createQueues(boss: PgBoss, settings: QueueSettings = {}): Promise<void> {
  const dead = `${QUEUES.analyzeCapture}.dead`;
  const queues: PgBoss.Queue[] = [
    // The last step before a capture's `error` verdict: generous retries (about two hours of
    // back-off) so a passing outage cannot leave it without one; the sweep is the last resort.
    { name: dead, policy: 'standard', retryLimit: 12, retryDelay: settings.retryDelaySeconds ?? 5, retryBackoff: true, expireInSeconds: 300 },
    {
      name: QUEUES.analyzeCapture,
      policy: 'standard',
      retryLimit: 4,
      retryDelay: settings.retryDelaySeconds ?? 5,
      retryBackoff: true,
      expireInSeconds: settings.analyzeExpireSeconds ?? 300,
      deadLetter: dead,
    },
    {
      name: QUEUES.evaluateImpact,
      policy: 'standard',
      retryLimit: 2,
      retryDelay: settings.retryDelaySeconds ?? 5,
      retryBackoff: true,
      expireInSeconds: 1800,
    },
    {
      // One run at a time across every worker (the run claims its rows with SKIP LOCKED as well);
      // an hour to finish, then the next scheduled run carries on where it stopped.
      name: QUEUES.applyRetention,
      policy: 'singleton',
      retryLimit: 2,
      retryDelay: settings.retryDelaySeconds ?? 60,
      retryBackoff: true,
      expireInSeconds: 3600,
    },
    {
      name: QUEUES.sendNotifications,
      policy: 'standard',
      retryLimit: 10,
      retryDelay: settings.retryDelaySeconds ?? 30,
      retryBackoff: true,
      expireInSeconds: 120,
    },
  ];
  for (const queue of queues) {
    if (!(await boss.getQueue(queue.name))) await createQueueOnce(boss, queue);
    else if (settings.updateExisting) await boss.updateQueue(queue.name, queue);
  }
}

/**
 * Creates a queue that another process may be creating at the same moment (the API and the
 * worker start together on a fresh database): pg-boss's create_queue can then deadlock or find
 * the queue's table already made. Such a failure is retried after re-reading whether the queue
 * exists by now; anything else is thrown.
 */
async function createQueueOnce(boss: PgBoss, queue: PgBoss.Queue): Promise<void> {
  for (let attempt = 1; ; attempt++) {
    try {
      await boss.createQueue(queue.name, queue);
      return;
    } catch (error) {
      // 40P01 deadlock, 23505 unique violation, 42P07 table exists: the other process is on it.
      const code = (error as { code?: string }).code;
      if (!['40P01', '23505', '42P07'].includes(code ?? '') || attempt >= 5) throw error;
      await new Promise((resolve) => setTimeout(resolve, 50 * attempt + Math.random() * 50));
      if (await boss.getQueue(queue.name)) return;
    }
  }
}

/** When the retention run starts: hourly, at a minute past the hour's busy start (UTC). */
export const RETENTION_CRON = '7 * * * *';

/**
 * Schedules the periodic jobs (pg-boss keeps one schedule per queue, so every worker calling this
 * at start-up is harmless; its cron monitor sends each run once).
 */
export async function scheduleMaintenance(boss: PgBoss): Promise<void> {
  await boss.schedule(QUEUES.applyRetention, RETENTION_CRON, {}, { tz: 'UTC' });
}
