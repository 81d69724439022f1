import { ConfigError } from './config-error.js';
import type { EnvRecord } from './env-source.js';

/**
 * `development` (the default: `npm start`, tests) fills every service address with the local
 * fakes' defaults; `production` has no such defaults, so a forgotten variable stops the process
 * instead of pointing it at a fake. Set with EARMARK_MODE, or NODE_ENV=production.
 */
export type RuntimeMode = 'development' | 'production';

export function runtimeModeOf(env: EnvRecord): RuntimeMode {
  const explicit = env.EARMARK_MODE;
  if (explicit === 'development' || explicit === 'production') return explicit;
  if (explicit) throw new ConfigError(`EARMARK_MODE: must be "development" or "production" (got ${JSON.stringify(explicit)})`, ['EARMARK_MODE']);
  return env.NODE_ENV === 'production' ? 'production' : 'development';
}
