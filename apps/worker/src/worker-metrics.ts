import type { VerdictOutcome } from '@earmark/contracts';
import { Counter, Histogram, type Registry } from '@earmark/platform';
import { classifyMailFailure } from './jobs/mail-failure.js';
import type { Mailer } from './mailer.js';

/** What judging reports: every verdict written, and how long each analysis took. */
export interface JudgingMetrics {
  verdictRecorded(outcome: VerdictOutcome): void;
  /** From the engine's start to the verdict committed, whatever was decided. */
  analysisTimed(outcome: VerdictOutcome, seconds: number): void;
}

/** The worker's own series; the registry also holds the process defaults and the shared gauges. */
export interface WorkerMetrics {
  judging: JudgingMetrics;
  /** Wraps a queue's handler so each run counts as completed (returned) or failed (threw; pg-boss retries). */
  countJobs<A extends unknown[], R>(queue: string, handler: (...args: A) => Promise<R>): (...args: A) => Promise<R>;
  /** The mailer, counting each message it hands to the relay by result. */
  countMail(mailer: Mailer): Mailer;
}

const OUTCOMES: readonly VerdictOutcome[] = ['pass', 'fail', 'error'];
// Seconds: a short tone check (tens of ms) to a long capture near the decoded-sample limit (minutes).
const ANALYSIS_BUCKETS = [0.05, 0.1, 0.25, 0.5, 1, 2, 5, 10, 20, 30, 60, 120];

export function createWorkerMetrics(registry: Registry, queues: readonly string[]): WorkerMetrics {
  const duration = new Histogram({
    name: 'earmark_analysis_duration_seconds',
    help: 'Analyses run by this worker, from the engine starting to the verdict committed, by verdict outcome.',
    labelNames: ['outcome'],
    buckets: ANALYSIS_BUCKETS,
    registers: [registry],
  });
  const verdicts = new Counter({
    name: 'earmark_verdicts_total',
    help: 'Verdicts written by this worker (analyses, abandoned captures), by outcome. A re-run job that finds its verdict already written adds nothing.',
    labelNames: ['outcome'],
    registers: [registry],
  });
  const jobs = new Counter({
    name: 'earmark_jobs_total',
    help: 'Job runs of this worker by queue and result (completed; failed: the handler threw, and pg-boss retries it or moves it on).',
    labelNames: ['queue', 'result'],
    registers: [registry],
  });
  const mails = new Counter({
    name: 'earmark_mails_sent_total',
    help: 'Messages this worker handed to the mail relay, by result (sent; refused: this message, it backs off; unreachable: the relay itself).',
    labelNames: ['result'],
    registers: [registry],
  });
  // Zero from the start, so rates and alerts have every series of a fresh process.
  for (const outcome of OUTCOMES) verdicts.inc({ outcome }, 0);
  for (const queue of queues) for (const result of ['completed', 'failed']) jobs.inc({ queue, result }, 0);
  for (const result of ['sent', 'refused', 'unreachable']) mails.inc({ result }, 0);

  return {
    judging: {
      verdictRecorded: (outcome) => verdicts.inc({ outcome }),
      analysisTimed: (outcome, seconds) => duration.observe({ outcome }, seconds),
    },
    countJobs(queue, handler) {
      return async (...args) => {
        try {
          const result = await handler(...args);
          jobs.inc({ queue, result: 'completed' });
          return result;
        } catch (error) {
          jobs.inc({ queue, result: 'failed' });
          throw error;
        }
      };
    },
    countMail(mailer) {
      return {
        async send(message) {
          try {
            await mailer.send(message);
            mails.inc({ result: 'sent' });
          } catch (error) {
            mails.inc({ result: classifyMailFailure(error) === 'relay' ? 'unreachable' : 'refused' });
            throw error;
          }
        },
        close: () => mailer.close(),
      };
    },
  };
}
