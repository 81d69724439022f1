/**
 * Why a send failed, as far as the outbox cares: the relay itself is unreachable (every
 * message would fail the same way, so the batch stops and nothing is charged an attempt),
 * or this one message was refused (its row backs off; the rest still go out).
 */
export type MailFailure = 'relay' | 'message';

// nodemailer's codes for a relay it could not talk to at all.
const RELAY_CODES = new Set(['ECONNECTION', 'ESOCKET', 'ETIMEDOUT', 'EDNS', 'ECONNREFUSED', 'ECONNRESET', 'EAUTH', 'ETLS']);

/** Anything not recognisably the relay counts as the message's own fault, so one odd row never blocks the rest. */
export function classifyMailFailure(error: unknown): MailFailure {
  const { code, responseCode } = (error ?? {}) as { code?: unknown; responseCode?: unknown };
  if (typeof code === 'string' && RELAY_CODES.has(code)) return 'relay';
  // 421: the relay is shutting the connection (overloaded, going down), not judging this message.
  if (responseCode === 421) return 'relay';
  return 'message';
}

/** Wait before attempt `attempts + 1`: the base, doubled per failed attempt, capped at a day. */
export function mailRetryDelayMs(attempts: number, baseMs: number): number {
  return Math.min(baseMs * 2 ** Math.max(0, attempts - 1), 24 * 3600_000);
}
