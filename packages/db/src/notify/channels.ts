/**
 * PostgreSQL NOTIFY channels the schema raises (triggers in the migrations). The payload of
 * each is named beside it; listeners must treat a notification as a hint to re-read, never
 * as the data itself (notifications are lost while a listener reconnects).
 */
export const NOTIFY_CHANNELS = {
  /** A verdict row was inserted; payload: the capture's id. Raised by the `verdict_notify` trigger at commit. */
  verdictRecorded: 'earmark_verdict_recorded',
} as const;

/** The table the sign-in limiter counts in (rate-limiter-flexible's RateLimiterPostgres layout). */
export const SIGN_IN_LIMIT_TABLE = 'sign_in_limit';
