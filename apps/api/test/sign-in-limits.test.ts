import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { WorkGate } from '../src/auth/work-gate.js';
import { startTestApi, type TestApi } from './support/test-api.js';

const attempt = (api: TestApi, email: string, headers: Record<string, string> = {}) =>
  api.request('POST', '/api/auth/login', { body: { email, password: 'guess-guess' }, headers });

describe('sign-in limits', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startTestApi({ EARMARK_LOGIN_RATE_LIMIT: '100', EARMARK_LOGIN_RATE_LIMIT_PER_ADDRESS: '4', EARMARK_LOGIN_RATE_LIMIT_PER_EMAIL: '100' });
  });
  afterAll(() => api.close());

  it('limits one address across many e-mails (unknown ones included)', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 5; i++) statuses.push((await attempt(api, `nobody-${i}@example.test`)).status);
    expect(statuses).toEqual([401, 401, 401, 401, 429]);
  });
});

describe('trusted proxy, when configured', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startTestApi({ EARMARK_TRUST_PROXY: 'loopback', EARMARK_LOGIN_RATE_LIMIT: '2' });
  });
  afterAll(() => api.close());

  it('keys the limiter on the forwarded client address', async () => {
    const from = (ip: string) => attempt(api, 'proxied@example.test', { 'x-forwarded-for': ip });
    expect([(await from('198.51.100.7')).status, (await from('198.51.100.7')).status, (await from('198.51.100.7')).status]).toEqual([401, 401, 429]);
    expect((await from('198.51.100.8')).status).toBe(401);
  });
});

describe('global cap and bounded password work', () => {
  let api: TestApi;
  beforeAll(async () => {
    api = await startTestApi({ EARMARK_LOGIN_GLOBAL_PER_MINUTE: '3', EARMARK_PASSWORD_WORK_CONCURRENCY: '1', EARMARK_PASSWORD_WORK_QUEUE: '0' });
  });
  afterAll(() => api.close());

  it('turns away sign-ins beyond the work queue with 429 and Retry-After', async () => {
    const results = await Promise.all([attempt(api, 'a@example.test'), attempt(api, 'b@example.test')]);
    const statuses = results.map((r) => r.status).sort();
    expect(statuses).toEqual([401, 429]);
    const busy = results.find((r) => r.status === 429)!;
    expect(busy.contentType).toMatch(/^application\/problem\+json/);
    expect(busy.headers.get('retry-after')).toBe('1');
  });

  it('caps sign-in attempts per minute across all addresses and e-mails', async () => {
    // Two attempts were spent above; one more fits, then the cap holds.
    expect((await attempt(api, 'c@example.test')).status).toBe(401);
    const capped = await attempt(api, 'd@example.test');
    expect(capped.status).toBe(429);
    expect(capped.body.detail).toContain('try again in a minute');
  });
});

describe('WorkGate', () => {
  it('runs at most N at once, queues up to the limit, refuses beyond it, and hands slots over in order', async () => {
    const gate = new WorkGate(2, 1);
    const a = await gate.enter();
    const b = await gate.enter();
    let cEntered = false;
    const c = gate.enter().then((release) => { cEntered = true; return release; });
    expect(await gate.enter()).toBeNull();
    expect(gate.stats).toEqual({ running: 2, waiting: 1 });
    await Promise.resolve();
    expect(cEntered).toBe(false);
    a!();
    a!(); // releasing twice frees one slot only
    const releaseC = await c;
    expect(cEntered).toBe(true);
    expect(gate.stats).toEqual({ running: 2, waiting: 0 });
    b!();
    releaseC!();
    expect(gate.stats).toEqual({ running: 0, waiting: 0 });
  });
});
