import { AnalyzeCaptureJob, QUEUES } from '@earmark/contracts';
import { initOrm } from '@earmark/db';
import { ANALYSIS_THREAD_MODULE, createGate, createJobProducer, createLinks, type Gate } from '@earmark/domain';
import { ObjectStore, createComputePool, startBoss, type ComputePool } from '@earmark/platform';
import type { MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import type { WorkerEnv } from './env.js';
import { analyzeCapture } from './jobs/analyze-capture.job.js';
import { evaluateImpact } from './jobs/evaluate-impact.job.js';
import { sendNotifications } from './jobs/send-notifications.job.js';
import { judgeAbandoned } from './jobs/abandon-capture.js';
import { createMailer, type Mailer } from './mailer.js';
import { sweep } from './sweeper.js';

export interface Worker {
  orm: MikroORM;
  boss: PgBoss;
  gate: Gate;
  mailer: Mailer;
  /** The analysis threads: one per slot (EARMARK_ANALYSIS_SLOTS). */
  analysisPool: ComputePool;
  /** Subscribes one handler per queue (and the dead-letter queue) and starts the sweep. */
  start(): Promise<void>;
  stop(): Promise<void>;
}

/**
 * The worker's composition root: the ORM, the queue, the object store, the links, the mailer
 * and the gate's services, built once. `worker.ts` and in-process tests both use it.
 */
export async function createWorker(env: WorkerEnv, logger: Logger): Promise<Worker> {
  const slots = env.EARMARK_ANALYSIS_SLOTS;
  const orm = await initOrm({ url: env.EARMARK_DATABASE_URL, poolMax: slots + 2 });
  const boss = await startBoss(env.EARMARK_DATABASE_URL, logger, {
    analyzeExpireSeconds: env.EARMARK_ANALYSIS_EXPIRE_S,
    retryDelaySeconds: env.EARMARK_JOB_RETRY_DELAY_S,
    maintenanceIntervalSeconds: env.EARMARK_JOB_MAINTENANCE_S,
    updateExisting: true,
  });
  const objectStore = new ObjectStore({
    endpoint: env.EARMARK_S3_ENDPOINT,
    bucket: env.EARMARK_S3_BUCKET,
    accessKeyId: env.EARMARK_S3_ACCESS_KEY,
    secretAccessKey: env.EARMARK_S3_SECRET_KEY,
  });
  const mailer = createMailer({ host: env.EARMARK_SMTP_HOST, port: env.EARMARK_SMTP_PORT, from: env.EARMARK_MAIL_FROM });
  const links = createLinks(env.EARMARK_PUBLIC_URL);
  const jobs = createJobProducer(boss);
  const gate = createGate({ objectStore, jobs, links, logger });
  // One thread per slot, started at once; fetching is sized to the slots, so the queue is only a margin.
  const analysisPool = createComputePool({ module: ANALYSIS_THREAD_MODULE, threads: slots, minThreads: slots, maxQueue: slots, memoryMbPerThread: env.EARMARK_ANALYSIS_MEMORY_MB });
  const analysis = { pool: analysisPool, memoryMb: env.EARMARK_ANALYSIS_MEMORY_MB };
  const analyzeDeps = { orm, objectStore, jobs, logger, links, maxAttempts: env.EARMARK_ANALYSIS_MAX_ATTEMPTS, delayMs: env.EARMARK_ANALYSIS_DELAY_MS, analysis };
  let sweepTimer: NodeJS.Timeout | undefined;

  return {
    orm,
    boss,
    gate,
    mailer,
    analysisPool,
    async start() {
      // Each thread loads the engine now rather than during its first capture.
      await Promise.all(Array.from({ length: slots }, () => analysisPool.run('warm', {})));
      // One fetch loop per slot, one job each, so every slot takes the next job the moment it is free
      // and the pool never has more analyses than threads. Each job gets its own EntityManager fork.
      for (let i = 0; i < slots; i++) {
        const loop: string = await boss.work(QUEUES.analyzeCapture, { batchSize: 1, includeMetadata: true, pollingIntervalSeconds: 0.5 }, async ([job]) => {
          if (!job) return;
          try {
            await analyzeCapture(job, analyzeDeps);
          } finally {
            // Fetch again at once instead of after the rest of the polling interval.
            boss.notifyWorker(loop);
          }
        });
      }
      // Jobs that ran out of retries: the capture is judged `error`, never left pending.
      await boss.work(`${QUEUES.analyzeCapture}.dead`, { batchSize: 1, pollingIntervalSeconds: 2 }, async ([job]) => {
        if (!job) return;
        const { captureId } = AnalyzeCaptureJob.parse(job.data);
        await judgeAbandoned(orm, captureId, 'Analysis abandoned: the job ran out of retries.', { links, jobs });
      });
      await boss.work(QUEUES.sendNotifications, { batchSize: 1, pollingIntervalSeconds: 1 }, async () => {
        await sendNotifications({ orm, mailer, logger, maxAttempts: env.EARMARK_MAIL_MAX_ATTEMPTS });
      });
      // Impact of a mask revision on past builds (ImpactRun): one run at a time, progress in the row.
      await boss.work(QUEUES.evaluateImpact, { batchSize: 1, pollingIntervalSeconds: 1 }, async ([job]) => {
        if (job) await evaluateImpact(job, { orm, objectStore, logger, analysis });
      });
      sweepTimer = setInterval(() => {
        sweep({ orm, jobs, logger, links, queuedAfterSeconds: env.EARMARK_SWEEP_INTERVAL_S * 2, analysisExpireSeconds: env.EARMARK_ANALYSIS_EXPIRE_S }).catch((error: unknown) => logger.warn({ err: error }, 'sweep failed'));
      }, env.EARMARK_SWEEP_INTERVAL_S * 1000);
    },
    async stop() {
      clearInterval(sweepTimer);
      await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
      await analysisPool.destroy();
      mailer.close();
      objectStore.destroy();
      await orm.close();
    },
  };
}
