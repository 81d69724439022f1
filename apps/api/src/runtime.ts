import os from 'node:os';
import { assertMigrated, initOrm, NOTIFY_CHANNELS } from '@earmark/db';
import { VIEWS_THREAD_MODULE, createGate, createJobProducer, createLinks, poolViewsCompute, registerSharedGauges, type Gate } from '@earmark/domain';
import { ObjectStore, createComputePool, createMetricsRegistry, dependencyChecks, healthProbes, objectStoreConfigOf, startBoss, type ComputePool, type HealthProbes, type Lifecycle, type Registry, type RunSql } from '@earmark/platform';
import type { MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import pg from 'pg';
import type { Logger } from 'pino';
import type { ApiEnv } from './env.js';
import { threadedPasswordChecks, type PasswordChecks } from './auth/password-checks.js';
import { startPgListener } from './waits/pg-listener.js';
import { VerdictWaits } from './waits/verdict-waits.js';
import { createApiMetrics, type ApiMetrics } from './metrics/api-metrics.js';

/** Everything the API process holds: built once, here, and closed together. */
export interface ApiRuntime {
  env: ApiEnv;
  logger: Logger;
  orm: MikroORM;
  objectStore: ObjectStore;
  /** Producer side of the job queue (queues created at start-up). */
  boss: PgBoss;
  gate: Gate;
  /** Threads for every CPU-heavy step of a request (decode, plot, WAV), so the event loop keeps answering. */
  compute: ComputePool;
  /** Requests waiting for a verdict, woken by this process's one LISTEN connection. */
  verdictWaits: VerdictWaits;
  /** A small pool beside the ORM's for the sign-in limiter: short connect timeout, so it fails fast (503) when the database is away. */
  limiterPool: pg.Pool;
  /** bcrypt on worker threads, so sign-ins do not hold up other requests. */
  passwords: PasswordChecks;
  /** This process's Prometheus registry: serve it with startMetricsServer on the metrics port. */
  metrics: Registry;
  /** The API's own series in `metrics` (HTTP requests, capture uploads). */
  apiMetrics: ApiMetrics;
  /** Set `lifecycle.draining = true` when shutdown begins: readiness then answers 503 on both ports. */
  lifecycle: Lifecycle;
  /** Liveness and readiness (database, queue, object store), for /livez, /readyz and /api/health/*. */
  health: HealthProbes;
  close(): Promise<void>;
}

/**
 * The API's composition root: the ORM, the queue, the object store, the links and every
 * service of the gate. `server.ts` and the tests both start the API through it.
 * @param existing.orm an ORM the caller already opened (tests that seed first); closed with the runtime
 * @param existing.instanceName the `instance` label of every series (EARMARK_INSTANCE_NAME); default `hostname:pid`
 */
export async function createApiRuntime(env: ApiEnv, logger: Logger, existing: { orm?: MikroORM; instanceName?: string } = {}): Promise<ApiRuntime> {
  const orm = existing.orm ?? (await initOrm({ url: env.EARMARK_DATABASE_URL, poolMax: env.EARMARK_DB_POOL_MAX }));
  try {
    await assertMigrated(orm);
  } catch (error) {
    if (!existing.orm) await orm.close();
    throw error;
  }
  const objectStore = new ObjectStore(objectStoreConfigOf(env));
  // Production never creates the bucket: a mistyped name must not become a new, empty bucket.
  const checkStore = env.EARMARK_MODE === 'production' ? objectStore.ping() : objectStore.ensureBucket();
  await checkStore.catch((error: unknown) => logger.warn({ err: error }, 'object store not reachable at start-up; uploads answer 503 until it is'));
  const boss = await startBoss(env.EARMARK_DATABASE_URL, logger);
  const compute = createComputePool({
    module: VIEWS_THREAD_MODULE,
    threads: env.EARMARK_API_COMPUTE_THREADS,
    maxQueue: env.EARMARK_API_COMPUTE_QUEUE,
    memoryMbPerThread: env.EARMARK_API_COMPUTE_MEMORY_MB,
  });
  const gate = createGate({ objectStore, jobs: createJobProducer(boss), links: createLinks(env.EARMARK_PUBLIC_URL), logger, compute: poolViewsCompute(compute, { maxPlotSamples: env.EARMARK_API_PLOT_MAX_SAMPLES }), storageQuotaDefaultBytes: env.EARMARK_PROJECT_QUOTA_BYTES });
  let listening = () => false;
  const verdictWaits = new VerdictWaits(env.EARMARK_VERDICT_WAIT_MAX_HELD, () => listening());
  const listener = startPgListener({
    connectionString: env.EARMARK_DATABASE_URL,
    channel: NOTIFY_CHANNELS.verdictRecorded,
    onNotify: (captureId) => verdictWaits.announce(captureId),
    onListening: () => verdictWaits.wakeAll(),
    logger,
  });
  listening = () => listener.listening;
  await listener.ready;
  const limiterPool = new pg.Pool({ connectionString: env.EARMARK_DATABASE_URL, max: 2, connectionTimeoutMillis: 2_000, application_name: 'earmark-api-limits' });
  // An idle client that loses its connection emits here; the next query reconnects.
  limiterPool.on('error', (error) => logger.warn({ err: error }, 'sign-in limiter connection lost'));
  const passwords = threadedPasswordChecks(env.EARMARK_PASSWORD_WORK_CONCURRENCY, env.EARMARK_PASSWORD_WORK_QUEUE);
  const metrics = createMetricsRegistry('api', existing.instanceName ?? `${os.hostname()}:${process.pid}`);
  const apiMetrics = createApiMetrics(metrics);
  const sql: RunSql = (query, params) => orm.em.fork().getConnection().execute(query, params);
  registerSharedGauges(metrics, sql);
  const lifecycle: Lifecycle = { draining: false };
  const health = healthProbes(dependencyChecks({ sql, boss, objectStore }), lifecycle);
  return {
    env,
    logger,
    orm,
    objectStore,
    boss,
    gate,
    compute,
    verdictWaits,
    limiterPool,
    passwords,
    metrics,
    apiMetrics,
    lifecycle,
    health,
    async close() {
      await listener.close();
      verdictWaits.wakeAll();
      await limiterPool.end();
      await passwords.close();
      await boss.stop({ graceful: true, wait: true, timeout: 5000 });
      await compute.destroy();
      objectStore.destroy();
      await orm.close();
    },
  };
}
