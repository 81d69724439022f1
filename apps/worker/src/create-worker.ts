import { AnalyzeCaptureJob, QUEUES } from '@earmark/contracts';
import { initOrm } from '@earmark/db';
import { createGate, createJobProducer, createLinks, type Gate } from '@earmark/domain';
import { ObjectStore, startBoss } from '@earmark/platform';
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
  /** Subscribes one handler per queue (and the dead-letter queue) and starts the sweep. */
  start(): Promise<void>;
  stop(): Promise<void>;
}

/**
 * The worker's composition root: the ORM, the queue, the object store, the links, the mailer
 * and the gate's services, built once. `worker.ts` and in-process tests both use it.
 */
export async function createWorker(env: WorkerEnv, logger: Logger): Promise<Worker> {
  const orm = await initOrm({ url: env.EARMARK_DATABASE_URL, poolMax: env.EARMARK_WORKER_CONCURRENCY + 2 });
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
  const analyzeDeps = { orm, objectStore, jobs, logger, links, maxAttempts: env.EARMARK_ANALYSIS_MAX_ATTEMPTS, delayMs: env.EARMARK_ANALYSIS_DELAY_MS };
  let sweepTimer: NodeJS.Timeout | undefined;

  return {
    orm,
    boss,
    gate,
    mailer,
    async start() {
      // One work() per unit of concurrency; each job gets its own EntityManager fork.
      for (let i = 0; i < env.EARMARK_WORKER_CONCURRENCY; i++) {
        await boss.work(QUEUES.analyzeCapture, { batchSize: 1, includeMetadata: true, pollingIntervalSeconds: 0.5 }, async ([job]) => {
          if (job) await analyzeCapture(job, analyzeDeps);
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
        if (job) await evaluateImpact(job, { orm, objectStore, logger });
      });
      sweepTimer = setInterval(() => {
        sweep({ orm, jobs, logger, links, queuedAfterSeconds: env.EARMARK_SWEEP_INTERVAL_S * 2, analysisExpireSeconds: env.EARMARK_ANALYSIS_EXPIRE_S }).catch((error: unknown) => logger.warn({ err: error }, 'sweep failed'));
      }, env.EARMARK_SWEEP_INTERVAL_S * 1000);
    },
    async stop() {
      clearInterval(sweepTimer);
      await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
      mailer.close();
      objectStore.destroy();
      await orm.close();
    },
  };
}
