export { ConfigError } from './config-error.js';
export { ENV_FILE_VAR, readEnvironment, resolveSecretFiles, type EnvRecord } from './env-source.js';
export { loadConfig, type LoadConfigOptions } from './load-config.js';
export { runtimeModeOf, type RuntimeMode } from './runtime-mode.js';
export * from './shared-vars.js';
export { createProcessLogger } from './process-logger.js';
export { exitOnStartupFailure } from './startup-failure.js';
