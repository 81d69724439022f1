// The CLI's HTTP client in-process, against small node:http servers: which answers are
// retried and which are not, how errors read, and that bodies are validated. Retry waits
// are shortened through the policy so the budget rules run in milliseconds.
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterEach, describe, expect, it } from 'vitest';
import { BuildRow } from '@earmark/contracts';
import { ApiClient, type RetryNotice } from '../src/api-client/api-client.js';
import { ApiError, ApiUnreachableError, UnexpectedResponseError } from '../src/api-client/api-error.js';
import { backoffDelay, parseRetryAfter, type RetryPolicy } from '../src/api-client/retry-policy.js';

const FAST: RetryPolicy = { maxTries: 3, budgetMs: 5_000, baseDelayMs: 10, maxDelayMs: 40 };
const open: Server[] = [];
afterEach(async () => {
  await Promise.all(open.splice(0).map((s) => new Promise<void>((resolve) => s.close(() => resolve()))));
});

async function serve(handler: (req: IncomingMessage, res: ServerResponse) => void): Promise<{ url: string; hits: () => number }> {
  let hits = 0;
  const server = createServer((req, res) => {
    hits += 1;
    req.resume();
    req.on('end', () => handler(req, res));
  });
  open.push(server);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return { url: `http://127.0.0.1:${(server.address() as AddressInfo).port}`, hits: () => hits };
}

const problem = (res: ServerResponse, status: number, title: string, detail: string, headers: Record<string, string> = {}) =>
  res.writeHead(status, { 'content-type': 'application/problem+json', ...headers }).end(JSON.stringify({ type: 'about:blank', title, status, detail }));

const ROW = { id: 'b1', projectKey: 'kestrel-buds', sha: 'abcdef1', label: null, branch: null, pipelineUrl: null, status: 'pending', createdAt: '2026-01-01T00:00:00Z', captureCount: 0 };

describe('Retry-After and backoff', () => {
  it('reads delay-seconds and HTTP dates; ignores what it cannot read', () => {
    const now = Date.parse('2026-03-01T12:00:00Z');
    expect(parseRetryAfter('3', now)).toBe(3000);
    expect(parseRetryAfter(' 0 ', now)).toBe(0);
    expect(parseRetryAfter('Sun, 01 Mar 2026 12:00:10 GMT', now)).toBe(10_000);
    expect(parseRetryAfter('Sun, 01 Mar 2026 11:00:00 GMT', now)).toBe(0);
    expect(parseRetryAfter('soon', now)).toBeUndefined();
    expect(parseRetryAfter('-5', now)).toBeUndefined();
    expect(parseRetryAfter(null, now)).toBeUndefined();
  });

  it('doubles from the base delay, stays within ±20 % jitter and under the cap', () => {
    const policy: RetryPolicy = { maxTries: 5, budgetMs: 60_000, baseDelayMs: 1000, maxDelayMs: 5000 };
    expect([1, 2, 3, 4].map((n) => backoffDelay(policy, n, () => 0.5))).toEqual([1000, 2000, 4000, 5000]);
    expect(backoffDelay(policy, 1, () => 0)).toBe(800);
    expect(backoffDelay(policy, 1, () => 1)).toBe(1200);
  });
});

describe('ApiClient', () => {
  it('sends the bearer token and validates the JSON answer', async () => {
    let auth: string | undefined;
    const s = await serve((req, res) => {
      auth = req.headers.authorization;
      res.writeHead(201, { 'content-type': 'application/json' }).end(JSON.stringify(ROW));
    });
    const client = new ApiClient({ server: `${s.url}/`, token: 'em_abc_def', retry: FAST });
    const { status, data } = await client.json(BuildRow, { method: 'POST', path: '/api/v1/projects/kestrel-buds/builds', json: { sha: 'abcdef1' } });
    expect(status).toBe(201);
    expect(data.sha).toBe('abcdef1');
    expect(auth).toBe('Bearer em_abc_def');
  });

  it('does not retry 401/403/404/413/415/422, and reports the problem as one line', async () => {
    for (const status of [401, 403, 404, 413, 415, 422]) {
      const s = await serve((_req, res) => problem(res, status, `Status ${status}`, 'line one\nline two'));
      const client = new ApiClient({ server: s.url, token: 't', retry: FAST });
      const error = await client.send({ method: 'GET', path: '/api/v1/x' }).catch((e: unknown) => e);
      expect(error).toBeInstanceOf(ApiError);
      expect((error as ApiError).status).toBe(status);
      expect((error as ApiError).message).toBe(`Status ${status}: line one line two`);
      expect(s.hits()).toBe(1);
    }
  });

  it('names the fields of a validation problem', async () => {
    const s = await serve((_req, res) =>
      res
        .writeHead(422, { 'content-type': 'application/problem+json' })
        .end(JSON.stringify({ type: 'about:blank', title: 'Validation failed', status: 422, detail: 'The query is not valid.', errors: [{ path: 'testCase', message: 'unknown test case' }] })),
    );
    const error = await new ApiClient({ server: s.url, token: 't', retry: FAST }).send({ method: 'GET', path: '/x' }).catch((e: unknown) => e);
    expect((error as Error).message).toBe('Validation failed: The query is not valid. (testCase: unknown test case)');
  });

  it('retries 503 up to maxTries, tells onRetry each time, then gives up with the problem', async () => {
    const s = await serve((_req, res) => problem(res, 503, 'Service unavailable', 'Storage is down.'));
    const notices: RetryNotice[] = [];
    const client = new ApiClient({ server: s.url, token: 't', retry: FAST, onRetry: (n) => notices.push(n) });
    const error = await client.send({ method: 'GET', path: '/api/v1/x' }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect((error as Error).message).toMatch(/^Service unavailable: Storage is down\. \(gave up after 3 tries over \d+ s\)$/);
    expect(s.hits()).toBe(3);
    expect(notices.map((n) => [n.nextTry, n.reason])).toEqual([
      [2, '503 Service unavailable'],
      [3, '503 Service unavailable'],
    ]);
  });

  it('stops at once when Retry-After asks for more than the retry budget', async () => {
    const s = await serve((_req, res) => problem(res, 503, 'Service unavailable', 'Maintenance.', { 'retry-after': '120' }));
    const client = new ApiClient({ server: s.url, token: 't', retry: { ...FAST, budgetMs: 60_000 } });
    const started = Date.now();
    await expect(client.send({ method: 'GET', path: '/x' })).rejects.toThrow('Service unavailable: Maintenance.');
    expect(s.hits()).toBe(1);
    expect(Date.now() - started).toBeLessThan(10_000);
  });

  it('recreates a streamed body for each attempt', async () => {
    const bodies: string[] = [];
    let n = 0;
    const server = createServer((req, res) => {
      const chunks: Buffer[] = [];
      req.on('data', (c: Buffer) => chunks.push(c));
      req.on('end', () => {
        bodies.push(Buffer.concat(chunks).toString());
        if ((n += 1) === 1) problem(res, 503, 'Busy', 'try later', { 'retry-after': '0' });
        else res.writeHead(200, { 'content-type': 'application/json' }).end(JSON.stringify(ROW));
      });
    });
    open.push(server);
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    const client = new ApiClient({ server: `http://127.0.0.1:${(server.address() as AddressInfo).port}`, token: 't', retry: FAST });
    let made = 0;
    const body = () => {
      made += 1;
      return new ReadableStream<Uint8Array>({
        start(c) {
          c.enqueue(new TextEncoder().encode('capture-bytes'));
          c.close();
        },
      });
    };
    await client.json(BuildRow, { method: 'POST', path: '/x', body, headers: { 'content-type': 'application/octet-stream' } });
    expect(made).toBe(2);
    expect(bodies).toEqual(['capture-bytes', 'capture-bytes']);
  });

  it('gives up on an unreachable server after maxTries with the socket error', async () => {
    const s = await serve(() => undefined);
    const dead = s.url;
    await Promise.all(open.splice(0).map((srv) => new Promise<void>((resolve) => srv.close(() => resolve()))));
    const client = new ApiClient({ server: dead, token: 't', retry: FAST });
    const error = await client.send({ method: 'GET', path: '/x' }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiUnreachableError);
    expect((error as Error).message).toMatch(new RegExp(`^cannot reach ${dead}: .*ECONNREFUSED.* \\(gave up after 3 tries over \\d+ s\\)$`));
  });

  it('turns a non-problem error page into a readable line', async () => {
    const s = await serve((_req, res) => res.writeHead(500, { 'content-type': 'text/html' }).end('<html>oops</html>'));
    const error = await new ApiClient({ server: s.url, token: 't', retry: FAST }).send({ method: 'GET', path: '/x' }).catch((e: unknown) => e);
    expect((error as Error).message).toBe('HTTP 500 Internal Server Error: the server did not answer with problem details; is --server the Earmark API?');
  });

  it('refuses a 2xx body that does not match the contract', async () => {
    const s = await serve((_req, res) => res.writeHead(200, { 'content-type': 'application/json' }).end(JSON.stringify({ ...ROW, captureCount: 'many' })));
    const error = await new ApiClient({ server: s.url, token: 't', retry: FAST }).json(BuildRow, { method: 'GET', path: '/api/v1/b' }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(UnexpectedResponseError);
    expect((error as Error).message).toMatch(/GET \/api\/v1\/b does not match this client \(captureCount: /);
  });

  it('keeps a path prefix of the server URL', () => {
    const client = new ApiClient({ server: 'https://tools.example.com/earmark/', token: 't' });
    expect(client.url('/api/v1/captures/1', { testCase: 'a b', target: undefined })).toBe('https://tools.example.com/earmark/api/v1/captures/1?testCase=a+b');
  });
});
