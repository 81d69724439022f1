/**
 * When and how long to wait before trying a request again. Only transient trouble is
 * retried: the server said it is busy (503, or 429/502/504 from a proxy in front of it)
 * or the connection failed. Everything else is an answer and is reported at once.
 */
export interface RetryPolicy {
  /** Attempts in all, the first one included. */
  maxTries: number;
  /** Retrying stops once this much time has passed since the first attempt. */
  budgetMs: number;
  /** Delay before the second attempt when the server gives no Retry-After; doubles each time. */
  baseDelayMs: number;
  /** No computed backoff waits longer than this. */
  maxDelayMs: number;
}

export const DEFAULT_RETRY_POLICY: RetryPolicy = { maxTries: 5, budgetMs: 60_000, baseDelayMs: 1_000, maxDelayMs: 15_000 };

const RETRYABLE_STATUSES = new Set([429, 502, 503, 504]);

export function isRetryableStatus(status: number): boolean {
  return RETRYABLE_STATUSES.has(status);
}

/**
 * Reads a Retry-After header (RFC 9110 §10.2.3: delay in seconds, or an HTTP date) as
 * milliseconds from `now`. Unreadable values give undefined, so the caller backs off itself.
 */
export function parseRetryAfter(value: string | null, now: number): number | undefined {
  if (value === null) return undefined;
  const trimmed = value.trim();
  if (/^\d+$/.test(trimmed)) return Number(trimmed) * 1000;
  // Date.parse reads bare numbers such as "-5" as years; an HTTP date always names a month.
  if (!/[A-Za-z]{3}/.test(trimmed)) return undefined;
  const date = Date.parse(trimmed);
  if (Number.isNaN(date)) return undefined;
  return Math.max(0, date - now);
}

/**
 * Exponential backoff for attempt `tries` (1 = the attempt that just failed), with ±20 %
 * jitter so that many pipelines refused at once do not come back at the same instant.
 */
export function backoffDelay(policy: RetryPolicy, tries: number, random: () => number = Math.random): number {
  const plain = Math.min(policy.maxDelayMs, policy.baseDelayMs * 2 ** (tries - 1));
  return Math.round(plain * (0.8 + 0.4 * random()));
}
