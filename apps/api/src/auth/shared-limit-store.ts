import { SIGN_IN_LIMIT_TABLE } from '@earmark/db';
import { ServiceUnavailableError } from '@earmark/domain';
import type { ClientRateLimitInfo, IncrementResponse, Options, Store } from 'express-rate-limit';
import type pg from 'pg';
import type { Logger } from 'pino';
import { RateLimiterPostgres, type RateLimiterRes } from 'rate-limiter-flexible';

const UNREACHABLE = 'Sign-in is unavailable while its attempt counts cannot be read; try again shortly.';

/**
 * An express-rate-limit store whose counts live in PostgreSQL (rate-limiter-flexible's
 * RateLimiterPostgres over the `sign_in_limit` table), so every API process sees the same
 * counts. Fails closed: when the database cannot be reached the sign-in answers 503, never
 * slips past the limit.
 */
export class SharedLimitStore implements Store {
  readonly localKeys = false;
  private limiter: RateLimiterPostgres | null = null;

  /** @param prefix names this limiter's keys in the shared table (one per limiter) */
  constructor(
    private readonly pool: pg.Pool,
    readonly prefix: string,
    private readonly logger: Logger,
  ) {}

  init(options: Options): void {
    this.limiter = new RateLimiterPostgres({
      storeClient: this.pool,
      storeType: 'pool',
      tableName: SIGN_IN_LIMIT_TABLE,
      // The table is made by a migration (20261202220200), not by the library at start-up.
      tableCreated: true,
      keyPrefix: this.prefix,
      // The store only counts; express-rate-limit compares with the limit and answers 429.
      points: Number.MAX_SAFE_INTEGER,
      duration: Math.ceil(options.windowMs / 1000),
    });
  }

  async increment(key: string): Promise<IncrementResponse> {
    return toInfo(await this.call((l) => l.penalty(key, 1)));
  }

  async decrement(key: string): Promise<void> {
    await this.call((l) => l.reward(key, 1));
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const res = await this.call((l) => l.get(key));
    return res ? toInfo(res) : undefined;
  }

  async resetKey(key: string): Promise<void> {
    await this.call((l) => l.delete(key));
  }

  private async call<T>(fn: (limiter: RateLimiterPostgres) => Promise<T>): Promise<T> {
    if (!this.limiter) throw new Error('SharedLimitStore used before express-rate-limit initialised it');
    try {
      return await fn(this.limiter);
    } catch (error) {
      this.logger.error({ err: error, limiter: this.prefix }, 'sign-in limiter cannot reach PostgreSQL; sign-ins answer 503');
      throw new ServiceUnavailableError(UNREACHABLE, 5);
    }
  }
}

function toInfo(res: RateLimiterRes): ClientRateLimitInfo {
  return { totalHits: res.consumedPoints, resetTime: res.msBeforeNext >= 0 ? new Date(Date.now() + res.msBeforeNext) : undefined };
}
