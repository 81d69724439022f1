import { initOrm } from '@earmark/db';
import { pino } from 'pino';
import { startBoss } from '@earmark/db';
import { loadWorkerEnv } from './env.js';

const env = loadWorkerEnv();
const logger = pino({ name: 'worker', level: env.EARMARK_LOG_LEVEL });
const orm = await initOrm({ url: env.EARMARK_DATABASE_URL, poolMax: env.EARMARK_WORKER_CONCURRENCY + 1 });
const boss = await startBoss(env.EARMARK_DATABASE_URL, logger);
// Analysis handlers are registered here as the ingest work lands; until then the worker idles.
logger.info({ concurrency: env.EARMARK_WORKER_CONCURRENCY }, 'worker ready');

async function shutdown(signal: string) {
  logger.info({ signal }, 'worker stopping');
  await boss.stop({ graceful: true, timeout: 10_000 });
  await orm.close();
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
