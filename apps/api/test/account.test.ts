import { ApiToken, AuditEvent, RefreshSession, User, hashPassword, TEST_PASSWORD } from '@earmark/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

let api: TestApi;
let adminToken: string;
beforeAll(async () => {
  api = await startTestApi();
  adminToken = await api.login('admin@example.test');
});
afterAll(() => api.close());

/** A user of its own per test, so changing a password never touches another test's sign-ins. */
async function freshUser(name: string): Promise<string> {
  const em = api.orm.em.fork();
  em.create(User, { email: `${name}@example.test`, displayName: name, passwordHash: await hashPassword(TEST_PASSWORD, 4) });
  await em.flush();
  return `${name}@example.test`;
}

async function signIn(email: string, password = TEST_PASSWORD) {
  return api.request('POST', '/api/auth/login', { body: { email, password } });
}

describe('PUT /api/me/password', () => {
  it('changes the password, ends every other session and answers a fresh one', async () => {
    const email = await freshUser('changer');
    const first = (await signIn(email)).body;
    const second = (await signIn(email)).body;
    const newPassword = 'a-new-and-longer-secret';

    const res = await api.request('PUT', '/api/me/password', { token: first.accessToken, body: { currentPassword: TEST_PASSWORD, newPassword } });
    expect(res.status, res.text).toBe(200);
    expect(res.body.user.email).toBe(email);

    // Both earlier sessions are over: access and refresh tokens alike.
    for (const old of [first, second]) {
      expect((await api.request('GET', '/api/me', { token: old.accessToken })).status).toBe(401);
      expect((await api.request('POST', '/api/auth/refresh', { body: { refreshToken: old.refreshToken } })).status).toBe(401);
    }
    // The fresh session works, refresh included.
    expect((await api.request('GET', '/api/me', { token: res.body.accessToken })).body.email).toBe(email);
    expect((await api.request('POST', '/api/auth/refresh', { body: { refreshToken: res.body.refreshToken } })).status).toBe(200);

    expect((await signIn(email)).status).toBe(401);
    expect((await signIn(email, newPassword)).status).toBe(200);

    const em = api.orm.em.fork();
    const user = await em.findOneOrFail(User, { email });
    expect(await em.count(RefreshSession, { user, revokedAt: null })).toBe(2); // the answer's and the last sign-in's
    const audit = await em.find(AuditEvent, { action: 'auth.password_changed', subject: `user:${email}` });
    expect(audit).toHaveLength(1);
    expect(audit[0]!.details).toEqual({ sessionsEnded: 2 });
  });

  it('refuses a wrong current password with 422 naming the field, changes nothing, and audits the attempt', async () => {
    const email = await freshUser('guesser');
    const token = (await signIn(email)).body.accessToken as string;
    const res = await api.request('PUT', '/api/me/password', { token, body: { currentPassword: 'not-my-password', newPassword: 'another-long-secret' } });
    expect(res.status).toBe(422);
    expect(res.contentType).toMatch(/problem\+json/);
    expect(res.body.detail).toBe('The current password is wrong; the password was not changed.');
    expect(res.body.errors).toEqual([{ path: 'body.currentPassword', message: 'does not match the password you sign in with' }]);
    // Still signed in, and the old password still works.
    expect((await api.request('GET', '/api/me', { token })).status).toBe(200);
    expect((await signIn(email)).status).toBe(200);
    const failed = await api.orm.em.fork().count(AuditEvent, { action: 'auth.password_change_failed', subject: `user:${email}` });
    expect(failed).toBe(1);
  });

  it.each([
    ['is too short', 'short-9ch', 'at least 10 characters'],
    ['is over 72 bytes of UTF-8', 'ä'.repeat(37), 'at most 72 bytes (UTF-8); letters such as ä take two'],
    ['equals the current one', TEST_PASSWORD, 'must differ from the current password'],
  ])('refuses a new password that %s, with the same rules as everywhere', async (_why, newPassword, message) => {
    const email = await freshUser(`rules-${Math.random().toString(36).slice(2, 8)}`);
    const token = (await signIn(email)).body.accessToken as string;
    const res = await api.request('PUT', '/api/me/password', { token, body: { currentPassword: TEST_PASSWORD, newPassword } });
    expect(res.status).toBe(422);
    expect(res.body.errors).toContainEqual({ path: 'body.newPassword', message });
    expect((await signIn(email)).status).toBe(200);
  });

  it('is refused to CI tokens, which act for a project and have no password', async () => {
    const created = await api.request('POST', '/api/projects/alpha-dsp/tokens', { token: adminToken, body: { name: 'ci' } });
    const res = await api.request('PUT', '/api/me/password', { token: created.body.secret, body: { currentPassword: 'x', newPassword: 'another-long-secret' } });
    expect(res.status).toBe(403);
  });
});

describe('API token expiry', () => {
  const inDays = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString();

  it('stores the chosen expiry, lists it, and audits it', async () => {
    const expiresAt = inDays(30);
    const created = await api.request('POST', '/api/projects/alpha-dsp/tokens', { token: adminToken, body: { name: 'nightly', expiresAt } });
    expect(created.status, created.text).toBe(201);
    expect(created.body.expiresAt).toBe(expiresAt);
    const list = await api.request('GET', '/api/projects/alpha-dsp/tokens', { token: adminToken });
    expect(list.body.items.find((t: { id: string }) => t.id === created.body.id).expiresAt).toBe(expiresAt);
    const audit = await api.orm.em.fork().findOneOrFail(AuditEvent, { action: 'token.create', subject: `token:${created.body.prefix}` });
    expect(audit.details).toMatchObject({ name: 'nightly', expiresAt });
  });

  it('keeps "never" as the default', async () => {
    const created = await api.request('POST', '/api/projects/alpha-dsp/tokens', { token: adminToken, body: { name: 'forever' } });
    expect(created.body.expiresAt).toBeNull();
    const explicit = await api.request('POST', '/api/projects/alpha-dsp/tokens', { token: adminToken, body: { name: 'forever', expiresAt: null } });
    expect(explicit.body.expiresAt).toBeNull();
  });

  it('refuses an expiry in the past or one that is not a date, naming the field', async () => {
    const past = await api.request('POST', '/api/projects/alpha-dsp/tokens', { token: adminToken, body: { name: 'late', expiresAt: '2020-01-01T00:00:00Z' } });
    expect(past.status).toBe(422);
    expect(past.body.detail).toBe('The token would expire before it is used.');
    expect(past.body.errors).toEqual([{ path: 'body.expiresAt', message: 'must be in the future (it is 2020-01-01T00:00:00.000Z)' }]);
    const garbage = await api.request('POST', '/api/projects/alpha-dsp/tokens', { token: adminToken, body: { name: 'late', expiresAt: 'next tuesday' } });
    expect(garbage.status).toBe(422);
    expect(garbage.body.errors[0].path).toBe('body.expiresAt');
  });

  it('lets a token work until it expires, then refuses it with 401 saying when it expired', async () => {
    const created = await api.request('POST', '/api/projects/alpha-dsp/tokens', { token: adminToken, body: { name: 'short-lived', expiresAt: inDays(1) } });
    const secret = created.body.secret as string;
    expect((await api.request('GET', '/api/v1/projects/alpha-dsp/builds', { token: secret })).status).toBe(200);

    await api.orm.em.fork().nativeUpdate(ApiToken, { id: created.body.id }, { expiresAt: new Date('2026-11-30T17:45:12Z') });
    for (const [method, path] of [['GET', '/api/v1/projects/alpha-dsp/builds'], ['POST', '/api/v1/projects/alpha-dsp/builds']] as const) {
      const res = await api.request(method, path, { token: secret, body: method === 'POST' ? { sha: 'abcdef9' } : undefined });
      expect(res.status).toBe(401);
      expect(res.contentType).toMatch(/problem\+json/);
      expect(res.body.code).toBe('token-expired');
      expect(res.body.detail).toBe("This API token expired on 2026-11-30 17:45 UTC; a project admin can create a new one on the project's API tokens page.");
    }
  });
});

describe('PUT /api/me/password under guessing', () => {
  it('limits wrong current passwords per address like sign-ins (429 with words)', async () => {
    const strict = await startTestApi({ EARMARK_LOGIN_RATE_LIMIT: '2' });
    try {
      const token = await strict.login('viewer@example.test');
      const attempt = (currentPassword: string) => strict.request('PUT', '/api/me/password', { token, body: { currentPassword, newPassword: 'another-long-secret' } });
      expect((await attempt('guess-one')).status).toBe(422);
      expect((await attempt('guess-two')).status).toBe(422);
      const third = await attempt(TEST_PASSWORD);
      expect(third.status).toBe(429);
      expect(third.body.detail).toBe('Too many wrong current passwords; wait a few minutes before trying again.');
    } finally {
      await strict.close();
    }
  });
});
