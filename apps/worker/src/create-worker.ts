import os from 'node:os';
import { AnalyzeCaptureJob, QUEUES } from '@earmark/contracts';
import { assertMigrated, initOrm } from '@earmark/db';
import { ANALYSIS_THREAD_MODULE, createGate, createJobProducer, createLinks, registerSharedGauges, type Gate } from '@earmark/domain';
import { ObjectStore, createComputePool, createMetricsRegistry, dependencyChecks, healthProbes, objectStoreConfigOf, scheduleMaintenance, startBoss, type ComputePool, type HealthProbes, type Lifecycle, type Registry, type RunSql } from '@earmark/platform';
import type { MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import type { WorkerEnv } from './env.js';
import { analyzeCapture } from './jobs/analyze-capture.job.js';
import { evaluateImpact } from './jobs/evaluate-impact.job.js';
import { applyRetentionJob } from './jobs/apply-retention.job.js';
import { sendNotifications } from './jobs/send-notifications.job.js';
import { judgeAbandoned } from './jobs/abandon-capture.js';
import { createMailer, type Mailer } from './mailer.js';
import { sweep } from './sweeper.js';
import { createWorkerMetrics } from './worker-metrics.js';

export interface Worker {
  logger: Logger;
  orm: MikroORM;
  boss: PgBoss;
  gate: Gate;
  mailer: Mailer;
  /** The analysis threads: one per slot (EARMARK_ANALYSIS_SLOTS). */
  analysisPool: ComputePool;
  /** This process's Prometheus registry: serve it with startMetricsServer on the metrics port. */
  metrics: Registry;
  /** Set `lifecycle.draining = true` when shutdown begins: readiness then answers 503. */
  lifecycle: Lifecycle;
  /** Liveness and readiness (database, queue, object store), for /livez and /readyz. */
  health: HealthProbes;
  /** Subscribes one handler per queue (and the dead-letter queue) and starts the sweep. */
  start(): Promise<void>;
  stop(): Promise<void>;
}

/**
 * The worker's composition root: the ORM, the queue, the object store, the links, the mailer
 * and the gate's services, built once. `worker.ts` and in-process tests both use it.
 * @param options.instanceName the `instance` label of every series (EARMARK_INSTANCE_NAME); default `hostname:pid`
 */
export async function createWorker(env: WorkerEnv, logger: Logger, options: { instanceName?: string } = {}): Promise<Worker> {
  const slots = env.EARMARK_ANALYSIS_SLOTS;
  const orm = await initOrm({ url: env.EARMARK_DATABASE_URL, poolMax: slots + 2 });
  try {
    await assertMigrated(orm);
  } catch (error) {
    await orm.close();
    throw error;
  }
  const boss = await startBoss(env.EARMARK_DATABASE_URL, logger, {
    analyzeExpireSeconds: env.EARMARK_ANALYSIS_EXPIRE_S,
    retryDelaySeconds: env.EARMARK_JOB_RETRY_DELAY_S,
    maintenanceIntervalSeconds: env.EARMARK_JOB_MAINTENANCE_S,
    updateExisting: true,
  });
  const objectStore = new ObjectStore(objectStoreConfigOf(env));
  const metrics = createMetricsRegistry('worker', options.instanceName ?? `${os.hostname()}:${process.pid}`);
  const deadLetters = `${QUEUES.analyzeCapture}.dead`;
  const workerMetrics = createWorkerMetrics(metrics, [QUEUES.analyzeCapture, deadLetters, QUEUES.sendNotifications, QUEUES.evaluateImpact, QUEUES.applyRetention]);
  const { judging, countJobs } = workerMetrics;
  const sql: RunSql = (query, params) => orm.em.fork().getConnection().execute(query, params);
  registerSharedGauges(metrics, sql);
  const lifecycle: Lifecycle = { draining: false };
  const health = healthProbes(dependencyChecks({ sql, boss, objectStore }), lifecycle);
  const relay = env.EARMARK_SMTP_URL ? { url: env.EARMARK_SMTP_URL } : { host: env.EARMARK_SMTP_HOST, port: env.EARMARK_SMTP_PORT };
  const mailer = workerMetrics.countMail(createMailer({ ...relay, from: env.EARMARK_MAIL_FROM }));
  const links = createLinks(env.EARMARK_PUBLIC_URL);
  const jobs = createJobProducer(boss);
  const gate = createGate({ objectStore, jobs, links, logger });
  // One thread per slot, started at once; fetching is sized to the slots, so the queue is only a margin.
  const analysisPool = createComputePool({ module: ANALYSIS_THREAD_MODULE, threads: slots, minThreads: slots, maxQueue: slots, memoryMbPerThread: env.EARMARK_ANALYSIS_MEMORY_MB });
  const analysis = { pool: analysisPool, memoryMb: env.EARMARK_ANALYSIS_MEMORY_MB };
  const analyzeDeps = { orm, objectStore, jobs, logger, links, maxAttempts: env.EARMARK_ANALYSIS_MAX_ATTEMPTS, delayMs: env.EARMARK_ANALYSIS_DELAY_MS, analysis, judging };
  let sweepTimer: NodeJS.Timeout | undefined;

  return {
    logger,
    orm,
    boss,
    gate,
    mailer,
    analysisPool,
    metrics,
    lifecycle,
    health,
    async start() {
      // Each thread loads the engine now rather than during its first capture.
      await Promise.all(Array.from({ length: slots }, () => analysisPool.run('warm', {})));
      // One fetch loop per slot, one job each, so every slot takes the next job the moment it is free
      // and the pool never has more analyses than threads. Each job gets its own EntityManager fork.
      const analyze = countJobs(QUEUES.analyzeCapture, analyzeCapture);
      for (let i = 0; i < slots; i++) {
        const loop: string = await boss.work(QUEUES.analyzeCapture, { batchSize: 1, includeMetadata: true, pollingIntervalSeconds: 0.5 }, async ([job]) => {
          if (!job) return;
          try {
            await analyze(job, analyzeDeps);
          } finally {
            // Fetch again at once instead of after the rest of the polling interval.
            boss.notifyWorker(loop);
          }
        });
      }
      // Jobs that ran out of retries: the capture is judged `error`, never left pending.
      await boss.work(deadLetters, { batchSize: 1, pollingIntervalSeconds: 2 }, async ([job]) => {
        if (!job) return;
        const { captureId } = AnalyzeCaptureJob.parse(job.data);
        await countJobs(deadLetters, judgeAbandoned)(orm, captureId, 'Analysis abandoned: the job ran out of retries.', { links, jobs, judging });
      });
      await boss.work(QUEUES.sendNotifications, { batchSize: 1, pollingIntervalSeconds: 1 }, countJobs(QUEUES.sendNotifications, async () => {
        await sendNotifications({ orm, mailer, logger, maxAttempts: env.EARMARK_MAIL_MAX_ATTEMPTS });
      }));
      // Impact of a mask revision on past builds (ImpactRun): one run at a time, progress in the row.
      await boss.work(QUEUES.evaluateImpact, { batchSize: 1, pollingIntervalSeconds: 1 }, async ([job]) => {
        if (job) await countJobs(QUEUES.evaluateImpact, evaluateImpact)(job, { orm, objectStore, logger, analysis });
      });
      // Data lifecycle, hourly: retention and orphaned objects (one run at a time across workers).
      await scheduleMaintenance(boss);
      await boss.work(QUEUES.applyRetention, { batchSize: 1, pollingIntervalSeconds: 30 }, async ([job]) => {
        if (job) await countJobs(QUEUES.applyRetention, applyRetentionJob)(job, { orm, objectStore, logger, env });
      });
      sweepTimer = setInterval(() => {
        sweep({ orm, jobs, logger, links, judging, queuedAfterSeconds: env.EARMARK_SWEEP_INTERVAL_S * 2, analysisExpireSeconds: env.EARMARK_ANALYSIS_EXPIRE_S }).catch((error: unknown) => logger.warn({ err: error }, 'sweep failed'));
      }, env.EARMARK_SWEEP_INTERVAL_S * 1000);
    },
    async stop() {
      clearInterval(sweepTimer);
      // Fetching stops at once; jobs in flight get EARMARK_WORKER_DRAIN_S to finish, after which
      // pg-boss fails them back to the queue (a retry, on another worker) before the threads stop.
      await boss.stop({ graceful: true, wait: true, timeout: env.EARMARK_WORKER_DRAIN_S * 1000 });
      await analysisPool.destroy();
      mailer.close();
      objectStore.destroy();
      await orm.close();
    },
  };
}
