import { ObjectStore, initOrm, startBoss } from '@earmark/db';
import { createApp } from './app.js';
import { loadApiEnv } from './env.js';
import { createLogger } from './logger.js';

const env = loadApiEnv();
const logger = createLogger(env.EARMARK_LOG_LEVEL, 'api');
const orm = await initOrm({ url: env.EARMARK_DATABASE_URL, poolMax: env.EARMARK_DB_POOL_MAX });
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
const { app } = createApp({ orm, env, logger, objectStore, boss });
const server = app.listen(env.EARMARK_API_PORT, env.EARMARK_API_HOST, () => {
  logger.info({ url: `http://${env.EARMARK_API_HOST}:${env.EARMARK_API_PORT}` }, 'api listening');
});
server.on('error', (error: NodeJS.ErrnoException) => {
  logger.fatal(error.code === 'EADDRINUSE' ? `port ${env.EARMARK_API_PORT} is already in use (set EARMARK_API_PORT)` : error.message);
  process.exit(1);
});

async function shutdown(signal: string) {
  logger.info({ signal }, 'shutting down');
  server.close();
  await boss.stop({ graceful: true, timeout: 5000 });
  objectStore.destroy();
  await orm.close();
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
