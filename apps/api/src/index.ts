export { createApp, type AppDeps, type EarmarkApp } from './app.js';
export { loadApiEnv, type ApiEnv } from './env.js';
export { createLogger } from './logger.js';
export type { RouteDef } from './http/route.js';
