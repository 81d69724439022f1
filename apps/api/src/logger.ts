import { createProcessLogger } from '@earmark/platform';
import type { Logger } from 'pino';

/** Structured logs (JSON lines, or pretty with EARMARK_LOG_FORMAT=pretty); request bodies are never logged, credentials are redacted. */
export function createLogger(level: string, name: string, opts: { format?: 'json' | 'pretty'; instance?: string } = {}): Logger {
  return createProcessLogger({ name, level, ...opts });
}
