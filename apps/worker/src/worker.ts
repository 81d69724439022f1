import { ENGINE_VERSION } from '@earmark/dsp';
import { pino } from 'pino';
import { createWorker } from './create-worker.js';
import { loadWorkerEnv } from './env.js';

const env = loadWorkerEnv();
const logger = pino({ name: 'worker', level: env.EARMARK_LOG_LEVEL });
const worker = await createWorker(env, logger);
await worker.start();
logger.info({ analysisSlots: env.EARMARK_ANALYSIS_SLOTS, analysisMemoryMb: env.EARMARK_ANALYSIS_MEMORY_MB, engineVersion: ENGINE_VERSION }, 'worker ready');

async function shutdown(signal: string) {
  logger.info({ signal }, 'worker stopping');
  await worker.stop();
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
