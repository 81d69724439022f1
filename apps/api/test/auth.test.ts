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
