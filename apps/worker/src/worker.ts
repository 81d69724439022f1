import { ENGINE_VERSION } from '@earmark/dsp';
import { createProcessLogger, exitOnStartupFailure } from '@earmark/platform';
import { createWorker, type Worker } from './create-worker.js';
import { loadWorkerEnv, type WorkerEnv } from './env.js';

let env: WorkerEnv;
let worker: Worker;
try {
  env = loadWorkerEnv();
  const logger = createProcessLogger({ name: 'worker', level: env.EARMARK_LOG_LEVEL, format: env.EARMARK_LOG_FORMAT, instance: env.EARMARK_INSTANCE_NAME });
  worker = await createWorker(env, logger);
  await worker.start();
  logger.info({ analysisSlots: env.EARMARK_ANALYSIS_SLOTS, analysisMemoryMb: env.EARMARK_ANALYSIS_MEMORY_MB, engineVersion: ENGINE_VERSION, mode: env.EARMARK_MODE }, 'worker ready');
} catch (error) {
  exitOnStartupFailure('worker', error);
}

async function shutdown(signal: string) {
  worker.logger.info({ signal }, 'worker stopping');
  await worker.stop();
  process.exit(0);
}
process.once('SIGTERM', () => void shutdown('SIGTERM'));
process.once('SIGINT', () => void shutdown('SIGINT'));
