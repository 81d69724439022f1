import type { Request, RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit, type Store } from 'express-rate-limit';
import type { ApiEnv } from '../env.js';
import { sendProblem } from '../http/problem.js';
import { WorkGate } from './work-gate.js';

/** Makes the counter store of one limiter; `name` tells the limiters' keys apart in a shared store. */
export type LimitStoreFactory = (name: string) => Store;

const FIFTEEN_MINUTES = 15 * 60 * 1000;

const emailOf = (req: Request) => String((req.body as { email?: unknown } | undefined)?.email ?? '').toLowerCase();
const addressOf = (req: Request) => ipKeyGenerator(req.ip ?? '');

const tooMany = (detail: string, retryAfterS?: number): RequestHandler => (req, res) =>
  sendProblem(
    res,
    { type: 'https://earmark.dev/problems/429', title: 'Too many sign-in attempts', status: 429, detail, instance: req.originalUrl },
    retryAfterS === undefined ? {} : { 'Retry-After': String(retryAfterS) },
  );

function limiter(opts: { windowMs: number; limit: number; failedOnly: boolean; key: (req: Request) => string; detail: string; store: Store }): RequestHandler {
  return rateLimit({
    store: opts.store,
    windowMs: opts.windowMs,
    limit: opts.limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    // Only failed attempts count where a team signing in all day must never be locked out.
    skipSuccessfulRequests: opts.failedOnly,
    keyGenerator: opts.key,
    // X-Forwarded-For is ignored on purpose unless EARMARK_TRUST_PROXY says otherwise.
    validate: { xForwardedForHeader: false },
    handler: tooMany(opts.detail),
  });
}

/** Runs the handlers one after another, like listing them in a route. */
function inSequence(handlers: RequestHandler[]): RequestHandler {
  return (req, res, next) => {
    let i = 0;
    const step = (err?: unknown) => {
      if (err) return next(err);
      const handler = handlers[i++];
      if (!handler) return next();
      void handler(req, res, step);
    };
    step();
  };
}

/** Holds a password-check slot for the rest of the request; a full queue answers 429 at once. */
function passwordWork(gate: WorkGate): RequestHandler {
  const busy = tooMany('The service is busy checking other sign-ins; try again in a moment.', 1);
  return (req, res, next) => {
    void gate.enter().then((release) => {
      if (!release) return busy(req, res, next);
      res.once('finish', release);
      res.once('close', release);
      next();
    });
  };
}

/**
 * Everything a sign-in passes before its password is checked: a global cap, failed attempts per
 * address, per e-mail and per both, then a bounded slot for the bcrypt work. The counts live where
 * `stores` puts them: PostgreSQL in the API (shared-limit-store.ts), so every API process enforces
 * the same limits; the password-work slots are per process (they bound this process's CPU).
 */
export function signInGuard(
  env: ApiEnv,
  stores: LimitStoreFactory,
  gate = new WorkGate(env.EARMARK_PASSWORD_WORK_CONCURRENCY, env.EARMARK_PASSWORD_WORK_QUEUE),
): RequestHandler {
  const wait = 'Wait a few minutes before trying again.';
  return inSequence([
    limiter({ windowMs: 60 * 1000, limit: env.EARMARK_LOGIN_GLOBAL_PER_MINUTE, failedOnly: false, key: () => 'all', detail: 'Too many sign-ins right now; try again in a minute.', store: stores('global') }),
    limiter({ windowMs: FIFTEEN_MINUTES, limit: env.EARMARK_LOGIN_RATE_LIMIT_PER_ADDRESS, failedOnly: true, key: (req) => `addr|${addressOf(req)}`, detail: wait, store: stores('address') }),
    limiter({ windowMs: FIFTEEN_MINUTES, limit: env.EARMARK_LOGIN_RATE_LIMIT_PER_EMAIL, failedOnly: true, key: (req) => `email|${emailOf(req)}`, detail: wait, store: stores('email') }),
    limiter({ windowMs: FIFTEEN_MINUTES, limit: env.EARMARK_LOGIN_RATE_LIMIT, failedOnly: true, key: (req) => `${addressOf(req)}|${emailOf(req)}`, detail: wait, store: stores('address-email') }),
    passwordWork(gate),
  ]);
}

/**
 * In front of a password change: the current password can be guessed there like at sign-in, so
 * failed attempts per address are limited the same way, and the bcrypt work takes a slot of the
 * same gate as sign-ins (pass sign-in's gate so both share this process's CPU bound).
 */
export function passwordChangeGuard(
  env: ApiEnv,
  stores: LimitStoreFactory,
  gate = new WorkGate(env.EARMARK_PASSWORD_WORK_CONCURRENCY, env.EARMARK_PASSWORD_WORK_QUEUE),
): RequestHandler {
  return inSequence([
    limiter({ windowMs: FIFTEEN_MINUTES, limit: env.EARMARK_LOGIN_RATE_LIMIT, failedOnly: true, key: (req) => `change|${addressOf(req)}`, detail: 'Too many wrong current passwords; wait a few minutes before trying again.', store: stores('password-change') }),
    passwordWork(gate),
  ]);
}
