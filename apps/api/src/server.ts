import { exitOnStartupFailure, startMetricsServer, type MetricsServer } from '@earmark/platform';
import { createApp } from './app.js';
import { loadApiEnv, type ApiEnv } from './env.js';
import { createLogger } from './logger.js';
import { createApiRuntime, type ApiRuntime } from './runtime.js';

/** How long requests in flight may take to finish after SIGTERM before their connections are cut. */
const DRAIN_MS = 25_000;

let env: ApiEnv;
let runtime: ApiRuntime;
let metricsServer: MetricsServer | undefined;
try {
  env = loadApiEnv();
  const logger = createLogger(env.EARMARK_LOG_LEVEL, 'api', { format: env.EARMARK_LOG_FORMAT, instance: env.EARMARK_INSTANCE_NAME });
  runtime = await createApiRuntime(env, logger, { instanceName: env.EARMARK_INSTANCE_NAME });
  if (env.EARMARK_METRICS_PORT !== undefined) {
    metricsServer = await startMetricsServer({ host: env.EARMARK_METRICS_HOST, port: env.EARMARK_METRICS_PORT, registry: runtime.metrics, ...runtime.health });
  }
} catch (error) {
  exitOnStartupFailure('api', error);
}
const { logger } = runtime;
const { app } = createApp(runtime);
const server = app.listen(env.EARMARK_API_PORT, env.EARMARK_API_HOST, () => {
  logger.info({ url: `http://${env.EARMARK_API_HOST}:${env.EARMARK_API_PORT}`, metrics: metricsServer ? `http://${env.EARMARK_METRICS_HOST}:${metricsServer.port}/metrics` : null, mode: env.EARMARK_MODE }, 'api listening');
});
server.on('error', (error: NodeJS.ErrnoException) => {
  logger.fatal(error.code === 'EADDRINUSE' ? `port ${env.EARMARK_API_PORT} is already in use (set EARMARK_API_PORT)` : error.message);
  process.exit(1);
});

let stopping: Promise<void> | undefined;

async function drainAndExit(signal: string) {
  logger.info({ signal }, 'shutting down');
  // Readiness answers 503 from now on, and new requests on kept-alive connections get 503.
  runtime.lifecycle.draining = true;
  // Held verdict waits answer now with what they have, instead of being cut at the drain deadline.
  runtime.verdictWaits.wakeAll();
  // Stop accepting, let requests in flight finish (an upload half-way must still reach its row
  // and its answer), and only then close the database and the queue under them.
  const drained = new Promise<void>((resolve) => server.close(() => resolve()));
  server.closeIdleConnections();
  const deadline = setTimeout(() => server.closeAllConnections(), DRAIN_MS);
  await drained;
  clearTimeout(deadline);
  await runtime.close();
  await metricsServer?.close();
  process.exit(0);
}
// One drain, whatever arrives: a second signal (a runner sending SIGINT after SIGTERM) must not start another.
const shutdown = (signal: string) => void (stopping ??= drainAndExit(signal));
process.on('SIGTERM', () => shutdown('SIGTERM'));
process.on('SIGINT', () => shutdown('SIGINT'));
