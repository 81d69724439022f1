import { QUEUES, type AnalyzeCaptureJob, type EvaluateImpactJob } from '@earmark/contracts';
import { QUEUED_AHEAD_SQL, REEVALUATION_PRIORITY, freshCapturePriority } from './fair-priority.js';

/** What the domain needs of a queue (pg-boss's `send` and `getDb`). */
export interface QueueSender {
  send(name: string, data: object, options?: { priority?: number }): Promise<string | null>;
  /** The database the queue lives in (the application's): read for each project's backlog. */
  getDb(): { executeSql(text: string, values?: unknown[]): Promise<{ rows: unknown[] }> };
}

/**
 * Typed producer of the gate's jobs: each method names its queue and payload once. `send`
 * (not `insert`) so every job gets its queue's retry, expiry and dead-letter settings.
 * @returns the job id, or null when the queue refused it (the worker's sweep catches up)
 */
export interface JobProducer {
  analyzeCapture(job: AnalyzeCaptureJob): Promise<string | null>;
  evaluateImpact(job: EvaluateImpactJob): Promise<string | null>;
  /** Wakes the mail sender; the outbox rows are already committed. */
  sendMail(reason: string): Promise<string | null>;
}

export function createJobProducer(queue: QueueSender): JobProducer {
  // Fair across projects (fair-priority.ts): a project's n-th waiting capture yields to any project's first.
  const priorityOf = async (job: AnalyzeCaptureJob): Promise<number> => {
    if (job.maskRevisionId) return REEVALUATION_PRIORITY;
    const { rows } = await queue.getDb().executeSql(QUEUED_AHEAD_SQL, [job.captureId]);
    return freshCapturePriority((rows[0] as { ahead?: number } | undefined)?.ahead ?? 0);
  };
  return {
    analyzeCapture: async (job) => queue.send(QUEUES.analyzeCapture, job, { priority: await priorityOf(job) }),
    evaluateImpact: (job) => queue.send(QUEUES.evaluateImpact, job),
    sendMail: (reason) => queue.send(QUEUES.sendNotifications, { reason }),
  };
}
