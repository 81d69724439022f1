import { ENGINE_VERSION } from '@earmark/dsp';
import { createProcessLogger, exitOnStartupFailure, startMetricsServer, type MetricsServer } from '@earmark/platform';
import { createWorker, type Worker } from './create-worker.js';
import { loadWorkerEnv, type WorkerEnv } from './env.js';

let env: WorkerEnv;
let worker: Worker;
let metricsServer: MetricsServer | undefined;
try {
  env = loadWorkerEnv();
  const logger = createProcessLogger({ name: 'worker', level: env.EARMARK_LOG_LEVEL, format: env.EARMARK_LOG_FORMAT, instance: env.EARMARK_INSTANCE_NAME });
  worker = await createWorker(env, logger, { instanceName: env.EARMARK_INSTANCE_NAME });
  // The port first: a worker that cannot bind it must fail before it has taken any job.
  if (env.EARMARK_METRICS_PORT !== undefined) {
    metricsServer = await startMetricsServer({ host: env.EARMARK_METRICS_HOST, port: env.EARMARK_METRICS_PORT, registry: worker.metrics, ...worker.health });
  }
  await worker.start();
  logger.info({ analysisSlots: env.EARMARK_ANALYSIS_SLOTS, analysisMemoryMb: env.EARMARK_ANALYSIS_MEMORY_MB, engineVersion: ENGINE_VERSION, mode: env.EARMARK_MODE, metrics: metricsServer ? `http://${env.EARMARK_METRICS_HOST}:${metricsServer.port}/metrics` : null }, 'worker ready');
} catch (error) {
  exitOnStartupFailure('worker', error);
}

let stopping: Promise<void> | undefined;

async function drainAndExit(signal: string) {
  worker.logger.info({ signal }, 'worker stopping');
  worker.lifecycle.draining = true;
  await worker.stop();
  await metricsServer?.close();
  process.exit(0);
}
// One drain, whatever arrives: a second signal must not cut the first one's wait for jobs in flight.
const shutdown = (signal: string) => void (stopping ??= drainAndExit(signal));
process.on('SIGTERM', () => shutdown('SIGTERM'));
process.on('SIGINT', () => shutdown('SIGINT'));
