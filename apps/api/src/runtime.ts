import { initOrm } from '@earmark/db';
import { createGate, createJobProducer, createLinks, type Gate } from '@earmark/domain';
import { ObjectStore, startBoss } from '@earmark/platform';
import type { MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import type { ApiEnv } from './env.js';

/** Everything the API process holds: built once, here, and closed together. */
export interface ApiRuntime {
  env: ApiEnv;
  logger: Logger;
  orm: MikroORM;
  objectStore: ObjectStore;
  /** Producer side of the job queue (queues created at start-up). */
  boss: PgBoss;
  gate: Gate;
  close(): Promise<void>;
}

/**
 * The API's composition root: the ORM, the queue, the object store, the links and every
 * service of the gate. `server.ts` and the tests both start the API through it.
 * @param existing.orm an ORM the caller already opened (tests that seed first); closed with the runtime
 */
export async function createApiRuntime(env: ApiEnv, logger: Logger, existing: { orm?: MikroORM } = {}): Promise<ApiRuntime> {
  const orm = existing.orm ?? (await initOrm({ url: env.EARMARK_DATABASE_URL, poolMax: env.EARMARK_DB_POOL_MAX }));
  if (await orm.getMigrator().checkMigrationNeeded()) {
    logger.warn('the database schema differs from the entities; run the migrations (npm start does)');
  }
  const objectStore = new ObjectStore({
    endpoint: env.EARMARK_S3_ENDPOINT,
    bucket: env.EARMARK_S3_BUCKET,
    accessKeyId: env.EARMARK_S3_ACCESS_KEY,
    secretAccessKey: env.EARMARK_S3_SECRET_KEY,
  });
  await objectStore.ensureBucket().catch((error: unknown) => logger.warn({ err: error }, 'object store not reachable at start-up; uploads answer 503 until it is'));
  const boss = await startBoss(env.EARMARK_DATABASE_URL, logger);
  const gate = createGate({ objectStore, jobs: createJobProducer(boss), links: createLinks(env.EARMARK_PUBLIC_URL), logger });
  return {
    env,
    logger,
    orm,
    objectStore,
    boss,
    gate,
    async close() {
      await boss.stop({ graceful: true, wait: true, timeout: 5000 });
      objectStore.destroy();
      await orm.close();
    },
  };
}
