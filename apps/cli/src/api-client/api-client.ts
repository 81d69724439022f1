import { setTimeout as delay } from 'node:timers/promises';
import { Problem } from '@earmark/contracts';
import type { z } from 'zod';
import { ApiError, ApiUnreachableError, BodySourceError, UnexpectedResponseError } from './api-error.js';
import { DEFAULT_RETRY_POLICY, backoffDelay, isRetryableStatus, parseRetryAfter, type RetryPolicy } from './retry-policy.js';

export interface RetryNotice {
  /** `POST /api/v1/…`, for the log line. */
  request: string;
  reason: string;
  delayMs: number;
  nextTry: number;
  maxTries: number;
}

export interface ApiClientOptions {
  /** Base URL of the server, e.g. `https://earmark.example.com` (a path prefix is kept). */
  server: string;
  token: string;
  retry?: RetryPolicy;
  /** Per attempt; a request that hangs longer counts as a network failure and is retried. */
  requestTimeoutMs?: number;
  onRetry?: (notice: RetryNotice) => void;
}

export interface ApiRequest {
  method: 'GET' | 'POST';
  /** Path below the server base, starting with `/api/v1/`; callers encode path segments. */
  path: string;
  query?: Record<string, string | undefined>;
  headers?: Record<string, string>;
  /** A JSON body, serialised once. */
  json?: unknown;
  /** A raw body, made afresh for every attempt because a stream can be read only once. */
  body?: () => ReadableStream<Uint8Array>;
  accept?: string;
  timeoutMs?: number;
  /** Epoch ms after which no attempt starts and no retry waits (the --wait deadline). */
  deadline?: number;
}

const USER_AGENT = 'earmark-cli/0.1';

/**
 * The one place the CLI talks HTTP to the Earmark API: bearer auth, bounded retries of
 * transient failures, problem+json errors turned into one-line ApiErrors, and zod
 * validation of every body it hands back.
 */
export class ApiClient {
  private readonly base: string;
  private readonly policy: RetryPolicy;

  constructor(private readonly options: ApiClientOptions) {
    this.base = options.server.replace(/\/+$/, '');
    this.policy = options.retry ?? DEFAULT_RETRY_POLICY;
  }

  /** Absolute URL of a path below the server base (also used for dashboard links). */
  url(path: string, query: Record<string, string | undefined> = {}): string {
    const url = new URL(this.base + path);
    for (const [key, value] of Object.entries(query)) if (value !== undefined) url.searchParams.set(key, value);
    return url.toString();
  }

  /** Sends the request and parses the JSON answer with `schema`. */
  async json<S extends z.ZodType>(schema: S, request: ApiRequest): Promise<{ status: number; data: z.output<S> }> {
    const response = await this.send({ accept: 'application/json', ...request });
    const label = `${request.method} ${request.path}`;
    let body: unknown;
    try {
      body = await response.json();
    } catch {
      throw new UnexpectedResponseError(`the server's answer to ${label} is not JSON; is --server the Earmark API?`);
    }
    const parsed = schema.safeParse(body);
    if (!parsed.success) {
      const issues = parsed.error.issues.slice(0, 3).map((i) => `${i.path.join('.') || '(root)'}: ${i.message}`);
      throw new UnexpectedResponseError(`the server's answer to ${label} does not match this client (${issues.join('; ')}); are the CLI and server versions compatible?`);
    }
    return { status: response.status, data: parsed.data };
  }

  /** Sends the request and returns the body as text (JUnit XML). */
  async text(request: ApiRequest): Promise<string> {
    return (await this.send(request)).text();
  }

  /** Returns a 2xx response, or throws ApiError / ApiUnreachableError once retrying is over. */
  async send(request: ApiRequest): Promise<Response> {
    const started = Date.now();
    const label = `${request.method} ${request.path}`;
    const limit = Math.min(started + this.policy.budgetMs, request.deadline ?? Infinity);
    for (let tries = 1; ; tries++) {
      let failure: { reason: string; retryAfterMs?: number; error: Error };
      try {
        const response = await this.attempt(request);
        if (response.ok) return response;
        const error = await toApiError(response);
        if (!isRetryableStatus(response.status)) throw error;
        const retryAfterMs = parseRetryAfter(response.headers.get('retry-after'), Date.now());
        failure = { reason: `${response.status} ${error.problem.title}`, error, ...(retryAfterMs === undefined ? {} : { retryAfterMs }) };
      } catch (error) {
        if (error instanceof ApiError || error instanceof BodySourceError) throw error;
        // fetch reports a failing body stream as `fetch failed` with the stream's error as cause.
        if (error instanceof Error && error.cause instanceof BodySourceError) throw error.cause;
        const { reason, transient } = networkFailure(error);
        const unreachable = new ApiUnreachableError(`cannot reach ${this.base}: ${reason}`);
        if (!transient) throw unreachable;
        failure = { reason, error: unreachable };
      }
      const wait = failure.retryAfterMs ?? backoffDelay(this.policy, tries);
      if (tries >= this.policy.maxTries || Date.now() + wait > limit) {
        const spent = Math.round((Date.now() - started) / 1000);
        failure.error.message += tries > 1 ? ` (gave up after ${tries} tries over ${spent} s)` : '';
        throw failure.error;
      }
      this.options.onRetry?.({ request: label, reason: failure.reason, delayMs: wait, nextTry: tries + 1, maxTries: this.policy.maxTries });
      await delay(wait);
    }
  }

  private attempt(request: ApiRequest): Promise<Response> {
    const headers: Record<string, string> = {
      authorization: `Bearer ${this.options.token}`,
      accept: request.accept ?? 'application/json',
      'user-agent': USER_AGENT,
      ...request.headers,
    };
    let body: string | ReadableStream<Uint8Array> | undefined;
    if (request.json !== undefined) {
      headers['content-type'] = 'application/json';
      body = JSON.stringify(request.json);
    } else if (request.body) {
      body = request.body();
    }
    let timeoutMs = request.timeoutMs ?? this.options.requestTimeoutMs ?? 60_000;
    if (request.deadline !== undefined) timeoutMs = Math.max(1, Math.min(timeoutMs, request.deadline - Date.now()));
    return fetch(this.url(request.path, request.query), {
      method: request.method,
      headers,
      ...(body === undefined ? {} : { body }),
      // A stream body needs half-duplex (Node's fetch refuses it otherwise).
      ...(body instanceof ReadableStream ? { duplex: 'half' as const } : {}),
      signal: AbortSignal.timeout(timeoutMs),
    });
  }
}

/** Reads an error response as a Problem; a body that is not problem+json still gives a readable line. */
async function toApiError(response: Response): Promise<ApiError> {
  const text = await response.text().catch(() => '');
  let problem: Problem | undefined;
  try {
    const parsed = Problem.safeParse(JSON.parse(text));
    if (parsed.success) problem = parsed.data;
  } catch {
    // Not JSON: a proxy's HTML page or an empty body; fall through to the generic line.
  }
  problem ??= {
    type: 'about:blank',
    title: `HTTP ${response.status}${response.statusText ? ` ${response.statusText}` : ''}`,
    status: response.status,
    detail: 'the server did not answer with problem details; is --server the Earmark API?',
  };
  return new ApiError(response.status, problem);
}

/**
 * Why fetch failed, and whether trying again could help: socket and DNS errors carry a
 * `code` (ECONNREFUSED, ECONNRESET, EAI_AGAIN, UND_ERR_SOCKET…) and may pass; errors
 * without one (a port fetch refuses to use, a malformed URL) will not.
 */
function networkFailure(error: unknown): { reason: string; transient: boolean } {
  if (error instanceof DOMException && (error.name === 'TimeoutError' || error.name === 'AbortError')) return { reason: 'no answer in time', transient: true };
  if (!(error instanceof Error)) return { reason: String(error), transient: false };
  // fetch wraps socket errors as `TypeError: fetch failed` with the real one as its cause;
  // an AggregateError (every address refused) has an empty message but a code.
  const cause = error.cause;
  if (!(cause instanceof Error)) return { reason: error.message, transient: false };
  const code = 'code' in cause && typeof cause.code === 'string' ? cause.code : undefined;
  return { reason: cause.message || code || error.message, transient: code !== undefined };
}
