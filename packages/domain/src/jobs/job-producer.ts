import { QUEUES, type AnalyzeCaptureJob, type EvaluateImpactJob } from '@earmark/contracts';

/** The one method of a queue the domain needs (pg-boss's `send`). */
export interface QueueSender {
  send(name: string, data: object): Promise<string | null>;
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
  return {
    analyzeCapture: (job) => queue.send(QUEUES.analyzeCapture, job),
    evaluateImpact: (job) => queue.send(QUEUES.evaluateImpact, job),
    sendMail: (reason) => queue.send(QUEUES.sendNotifications, { reason }),
  };
}
