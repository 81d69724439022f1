import { ConnectionException } from '@mikro-orm/core';

/** Seconds a client waits before retrying while the database is unreachable (a restart takes a few). */
export const DATABASE_RETRY_AFTER_S = 5;

// Connection-level failures of pg/knex that reach a handler unwrapped: the server refused, reset
// or ended the connection, or is shutting down (SQLSTATE class 57P: operator intervention), or
// the pool could not hand out a connection in time.
const CONNECTION_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', '57P01', '57P02', '57P03']);
const CONNECTION_MESSAGES = /Connection terminated|Client has encountered a connection error|Knex: Timeout acquiring a connection|connection is closed/i;

/**
 * Whether an error means "the database cannot be reached right now" rather than a fault of
 * the request: such requests answer 503 with Retry-After, like an object-store outage, so
 * clients retry instead of treating the upload as broken.
 */
export function isDatabaseUnavailable(error: unknown): boolean {
  for (let e: unknown = error, depth = 0; e && depth < 4; e = (e as { cause?: unknown }).cause, depth++) {
    if (e instanceof ConnectionException) return true;
    const { code, message } = e as { code?: unknown; message?: unknown };
    if (typeof code === 'string' && CONNECTION_CODES.has(code)) return true;
    if (typeof message === 'string' && CONNECTION_MESSAGES.test(message)) return true;
  }
  return false;
}
