import jwt from 'jsonwebtoken';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TEST_PASSWORD, User } from '@earmark/db';
import { startTestApi, TEST_JWT_SECRET, type TestApi } from './support/test-api.js';

let api: TestApi;
beforeAll(async () => {
  api = await startTestApi({ EARMARK_LOGIN_RATE_LIMIT: '5' });
});
afterAll(() => api.close());

const expectProblem = (res: { contentType: string; body: { status: number; title: string; detail?: string } }, status: number) => {
  expect(res.contentType).toMatch(/^application\/problem\+json/);
  expect(res.body.status).toBe(status);
  expect(res.body.title).toBeTruthy();
  expect(res.body.detail).toBeTruthy();
  expect(JSON.stringify(res.body)).not.toMatch(/\bat .+\(.+:\d+:\d+\)/); // no stack frames
};

describe('sign-in', () => {
  it('returns a session with the user and their project roles', async () => {
    const res = await api.request('POST', '/api/auth/login', { body: { email: 'qa_manager@example.test', password: TEST_PASSWORD } });
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe('qa_manager@example.test');
    expect(res.body.user.memberships).toEqual([{ projectKey: 'alpha-dsp', projectName: 'Alpha DSP', role: 'qa_manager' }]);
    expect(res.body.expiresIn).toBe(api.env.EARMARK_ACCESS_TOKEN_TTL_S);
    const claims = jwt.decode(res.body.accessToken, { complete: true });
    expect(claims?.header.alg).toBe('HS256');
  });

  it('answers a wrong password with 401 problem+json, the same as an unknown e-mail', async () => {
    const wrong = await api.request('POST', '/api/auth/login', { body: { email: 'viewer@example.test', password: 'nope' } });
    const unknown = await api.request('POST', '/api/auth/login', { body: { email: 'ghost@example.test', password: 'nope' } });
    expectProblem(wrong, 401);
    expectProblem(unknown, 401);
    expect(wrong.body.detail).toBe(unknown.body.detail);
  });

  it('answers malformed JSON with 400', async () => {
    const res = await api.request('POST', '/api/auth/login', { rawBody: '{"email": "x@', headers: { 'content-type': 'application/json' } });
    expectProblem(res, 400);
    expect(res.body.title).toBe('Malformed JSON');
  });

  it('answers a body failing its schema with 422 naming the field', async () => {
    const res = await api.request('POST', '/api/auth/login', { body: { email: 'not-an-email', password: 'x' } });
    expectProblem(res, 422);
    expect(res.body.errors.map((e: { path: string }) => e.path)).toContain('body.email');
    expect(res.body.detail).toContain('body.email');
  });

  it('rate-limits repeated attempts on one account with 429', async () => {
    const attempt = () => api.request('POST', '/api/auth/login', { body: { email: 'outsider@example.test', password: 'guess' } });
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) statuses.push((await attempt()).status);
    expect(statuses.slice(0, 5)).toEqual([401, 401, 401, 401, 401]);
    expect(statuses[5]).toBe(429);
    const limited = await attempt();
    expectProblem(limited, 429);
    expect(limited.headers.get('ratelimit-policy') ?? limited.headers.get('ratelimit')).toBeTruthy();
  });
});

describe('access tokens', () => {
  it('accepts a fresh token on /api/me', async () => {
    const token = await api.login('viewer@example.test');
    const res = await api.request('GET', '/api/me', { token });
    expect(res.status).toBe(200);
    expect(res.body.memberships[0].role).toBe('viewer');
  });

  it('rejects a token signed with alg none', async () => {
    const user = await api.orm.em.fork().findOneOrFail(User, { email: 'viewer@example.test' });
    const unsigned = jwt.sign({ sub: user.id, typ: 'access', ver: 0 }, '', { algorithm: 'none', issuer: 'earmark' });
    expectProblem(await api.request('GET', '/api/me', { token: unsigned }), 401);
  });

  it('rejects a token with a wrong signature', async () => {
    const user = await api.orm.em.fork().findOneOrFail(User, { email: 'viewer@example.test' });
    const forged = jwt.sign({ sub: user.id, typ: 'access', ver: 0 }, 'another-secret-another-secret-another-secret', { algorithm: 'HS256', issuer: 'earmark' });
    expectProblem(await api.request('GET', '/api/me', { token: forged }), 401);
  });

  it('rejects an expired token', async () => {
    const user = await api.orm.em.fork().findOneOrFail(User, { email: 'viewer@example.test' });
    const expired = jwt.sign({ sub: user.id, typ: 'access', ver: 0, exp: Math.floor(Date.now() / 1000) - 10 }, TEST_JWT_SECRET, { algorithm: 'HS256', issuer: 'earmark' });
    const res = await api.request('GET', '/api/me', { token: expired });
    expectProblem(res, 401);
    expect(res.headers.get('www-authenticate')).toBe('Bearer');
  });

  it('does not accept a refresh token as an access token', async () => {
    const login = await api.request('POST', '/api/auth/login', { body: { email: 'viewer@example.test', password: TEST_PASSWORD } });
    expectProblem(await api.request('GET', '/api/me', { token: login.body.refreshToken }), 401);
  });

  it('refreshes, and sign-out ends both access and refresh tokens', async () => {
    const login = await api.request('POST', '/api/auth/login', { body: { email: 'engineer@example.test', password: TEST_PASSWORD } });
    expect(login.status).toBe(200);
    const refreshed = await api.request('POST', '/api/auth/refresh', { body: { refreshToken: login.body.refreshToken } });
    expect(refreshed.status).toBe(200);
    expect((await api.request('GET', '/api/me', { token: refreshed.body.accessToken })).status).toBe(200);

    expect((await api.request('POST', '/api/auth/logout', { token: refreshed.body.accessToken })).status).toBe(204);
    expectProblem(await api.request('GET', '/api/me', { token: refreshed.body.accessToken }), 401);
    expectProblem(await api.request('POST', '/api/auth/refresh', { body: { refreshToken: login.body.refreshToken } }), 401);
  });
});

describe('refresh-token rotation', () => {
  const signIn = async (email: string) => {
    const res = await api.request('POST', '/api/auth/login', { body: { email, password: TEST_PASSWORD } });
    expect(res.status).toBe(200);
    return res.body.refreshToken as string;
  };
  const refresh = (refreshToken: string) => api.request('POST', '/api/auth/refresh', { body: { refreshToken } });

  it('returns a new refresh token on each refresh, and the chain keeps working', async () => {
    const first = await signIn('viewer@example.test');
    const r1 = await refresh(first);
    expect(r1.status).toBe(200);
    expect(r1.body.refreshToken).not.toBe(first);
    const r2 = await refresh(r1.body.refreshToken);
    expect(r2.status).toBe(200);
    expect(r2.body.refreshToken).not.toBe(r1.body.refreshToken);
    expect((await api.request('GET', '/api/me', { token: r2.body.accessToken })).body.email).toBe('viewer@example.test');
  });

  it('treats a second use of a refresh token as theft: 401, and the newer token of that sign-in dies too', async () => {
    const first = await signIn('viewer@example.test');
    const other = await signIn('viewer@example.test'); // another device: a separate chain
    const rotated = await refresh(first);
    expect(rotated.status).toBe(200);

    const reused = await refresh(first);
    expectProblem(reused, 401);
    expectProblem(await refresh(rotated.body.refreshToken), 401);
    // The other sign-in of the same user is untouched.
    expect((await refresh(other)).status).toBe(200);
  });

  it('lets only one of two simultaneous refreshes with the same token succeed', async () => {
    const first = await signIn('engineer@example.test');
    const statuses = (await Promise.all([refresh(first), refresh(first)])).map((r) => r.status).sort();
    expect(statuses).toEqual([200, 401]);
  });

  it('rejects a refresh token without a sign-in chain (issued before rotation)', async () => {
    const user = await api.orm.em.fork().findOneOrFail(User, { email: 'viewer@example.test' });
    const legacy = jwt.sign({ sub: user.id, typ: 'refresh', ver: user.tokenVersion }, TEST_JWT_SECRET, { algorithm: 'HS256', issuer: 'earmark', expiresIn: 600 });
    expectProblem(await refresh(legacy), 401);
  });
});

describe('password length (bcrypt reads only 72 bytes)', () => {
  const seventyTwoBytes = 'ü'.repeat(30) + 'x'.repeat(12); // 60 + 12 bytes in UTF-8

  it('refuses a new password over 72 bytes with 422 naming the limit', async () => {
    const token = await api.login('admin@example.test');
    const res = await api.request('POST', '/api/admin/users', {
      token,
      body: { email: 'long-pass@example.test', displayName: 'Long', password: 'ü'.repeat(37) }, // 37 characters, 74 bytes
    });
    expectProblem(res, 422);
    expect(res.body.detail).toContain('72 bytes');
    expect(await api.orm.em.fork().findOne(User, { email: 'long-pass@example.test' })).toBeNull();
  });

  it('accepts exactly 72 bytes, and a sign-in with more than that fails even if the first 72 match', async () => {
    const token = await api.login('admin@example.test');
    const created = await api.request('POST', '/api/admin/users', {
      token,
      body: { email: 'edge-pass@example.test', displayName: 'Edge', password: seventyTwoBytes },
    });
    expect(created.status).toBe(201);
    const good = await api.request('POST', '/api/auth/login', { body: { email: 'edge-pass@example.test', password: seventyTwoBytes } });
    expect(good.status).toBe(200);
    const padded = await api.request('POST', '/api/auth/login', { body: { email: 'edge-pass@example.test', password: `${seventyTwoBytes}anything` } });
    expectProblem(padded, 401);
  });
});

describe('sign-in limiter key', () => {
  it('ignores X-Forwarded-For by default, so rotating it does not dodge the limit', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) {
      const res = await api.request('POST', '/api/auth/login', {
        body: { email: 'xff-target@example.test', password: 'guess' },
        headers: { 'x-forwarded-for': `203.0.113.${i + 1}` },
      });
      statuses.push(res.status);
    }
    expect(statuses).toEqual([401, 401, 401, 401, 401, 429]);
  });
});

describe('HTTP hygiene', () => {
  it('answers an unknown API route with 404 problem+json', async () => {
    const res = await api.request('GET', '/api/no-such-thing');
    expectProblem(res, 404);
  });

  it('sends helmet security headers', async () => {
    const res = await api.request('GET', '/api/health');
    expect(res.status).toBe(200);
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    expect(res.headers.get('content-security-policy')).toContain("default-src 'self'");
    expect(res.headers.get('x-powered-by')).toBeNull();
  });

  it('never writes passwords or bearer tokens to the log', async () => {
    const token = await api.login('qa_manager@example.test');
    await api.request('GET', '/api/me', { token });
    const log = api.logLines.join('\n');
    expect(log).toContain('/api/me');
    expect(log).not.toContain(TEST_PASSWORD);
    expect(log).not.toContain(token);
  });
});
