import { pino, type Logger } from 'pino';

/** Structured JSON logs; request bodies are never logged, credentials are redacted. */
export function createLogger(level: string, name: string): Logger {
  return pino({ name, level, redact: { paths: ['password', '*.password', 'secret', '*.secret', 'token', '*.token'], censor: '[redacted]' } });
}
