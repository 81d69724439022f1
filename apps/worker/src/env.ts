import { availableParallelism } from 'node:os';
import { z } from 'zod';

const Env = z.object({
  EARMARK_DATABASE_URL: z.string().startsWith('postgres'),
  /** Analyses at once in this process, each in its own thread (one core each); default: one per core. */
  EARMARK_ANALYSIS_SLOTS: z.coerce.number().int().min(1).max(64).optional(),
  /** The old name of EARMARK_ANALYSIS_SLOTS, still read when the new one is unset. */
  EARMARK_WORKER_CONCURRENCY: z.coerce.number().int().min(1).max(64).optional(),
  /**
   * Memory budget of one analysis slot (MiB): its thread's V8 heap limit, and the bound a capture's
   * analysis is checked against before it starts. Fits a capture at the decoded-sample limit plus
   * the thread's stimulus cache (docs/capture-formats.md, "Memory of one analysis").
   */
  EARMARK_ANALYSIS_MEMORY_MB: z.coerce.number().int().min(16).max(65536).default(3584),
  EARMARK_LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  EARMARK_S3_ENDPOINT: z.url().default('http://127.0.0.1:4312'),
  EARMARK_S3_BUCKET: z.string().min(3).default('earmark-captures'),
  EARMARK_S3_ACCESS_KEY: z.string().default('S3RVER'),
  EARMARK_S3_SECRET_KEY: z.string().default('S3RVER'),
  EARMARK_SMTP_HOST: z.string().default('127.0.0.1'),
  EARMARK_SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(4325),
  EARMARK_MAIL_FROM: z.string().default('Earmark <earmark@localhost>'),
  EARMARK_PUBLIC_URL: z.url().default('http://127.0.0.1:4310'),
  /** Attempts at one outbox message the relay refuses before it is marked `failed` (waits double from a minute). */
  EARMARK_MAIL_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(30).default(8),
  /** How often the worker re-queues captures and mail that fell through the cracks. */
  EARMARK_SWEEP_INTERVAL_S: z.coerce.number().min(0.2).default(30),
  /** Attempts at one capture before it is judged `error` (crashes, timeouts, storage outages). */
  EARMARK_ANALYSIS_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(20).default(4),
  /** Seconds an analysis may run before it is failed and retried (how soon a killed worker's job comes back). */
  EARMARK_ANALYSIS_EXPIRE_S: z.coerce.number().int().min(1).default(300),
  EARMARK_JOB_RETRY_DELAY_S: z.coerce.number().int().min(1).default(5),
  EARMARK_JOB_MAINTENANCE_S: z.coerce.number().int().min(1).default(60),
  /** Fault injection for recovery tests only: hold each analysis this long after it starts. */
  EARMARK_ANALYSIS_DELAY_MS: z.coerce.number().int().min(0).default(0),
});
export type WorkerEnv = Omit<z.infer<typeof Env>, 'EARMARK_ANALYSIS_SLOTS' | 'EARMARK_WORKER_CONCURRENCY'> & { EARMARK_ANALYSIS_SLOTS: number };

/** The only place the worker reads process.env. */
export function loadWorkerEnv(env: NodeJS.ProcessEnv = process.env): WorkerEnv {
  const parsed = Env.safeParse(env);
  if (!parsed.success) {
    throw new Error(`Invalid worker environment: ${parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`);
  }
  const { EARMARK_ANALYSIS_SLOTS, EARMARK_WORKER_CONCURRENCY, ...rest } = parsed.data;
  // Every core: the event loop only polls jobs and writes verdicts while the threads analyse.
  return { ...rest, EARMARK_ANALYSIS_SLOTS: EARMARK_ANALYSIS_SLOTS ?? EARMARK_WORKER_CONCURRENCY ?? Math.max(1, availableParallelism()) };
}
