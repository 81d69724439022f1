export { createApp, type EarmarkApp } from './app.js';
export { loadApiEnv, type ApiEnv } from './env.js';
export { createLogger } from './logger.js';
export type { RouteDef } from './http/route.js';
export { createApiRuntime, type ApiRuntime } from './runtime.js';
