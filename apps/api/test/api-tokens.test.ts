import { ApiToken, AuditEvent } from '@earmark/db';
import { hashToken } from '@earmark/platform';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

let api: TestApi;
let adminToken: string;
beforeAll(async () => {
  api = await startTestApi();
  adminToken = await api.login('admin@example.test');
});
afterAll(() => api.close());

async function createCiToken(projectKey: string, scopes?: string[]) {
  const res = await api.request('POST', `/api/projects/${projectKey}/tokens`, { token: adminToken, body: { name: 'pipeline', ...(scopes ? { scopes } : {}) } });
  expect(res.status).toBe(201);
  return res.body as { id: string; prefix: string; secret: string; scopes: string[] };
}

describe('CI API tokens', () => {
  it('shows the secret once and stores only its SHA-256', async () => {
    const created = await createCiToken('alpha-dsp');
    expect(created.secret).toMatch(/^em_[a-z0-9]{10}_[A-Za-z0-9_-]{43}$/);
    expect(created.secret.startsWith(`em_${created.prefix}_`)).toBe(true);

    const list = await api.request('GET', '/api/projects/alpha-dsp/tokens', { token: adminToken });
    expect(list.text).not.toContain(created.secret);
    expect(list.body.items.find((t: { id: string }) => t.id === created.id).prefix).toBe(created.prefix);

    const row = await api.orm.em.fork().findOneOrFail(ApiToken, { id: created.id });
    expect(row.secretHash).toBe(hashToken(created.secret));
    expect(JSON.stringify(row)).not.toContain(created.secret);
  });

  it('authenticates on /api/v1, records last use, and upserts a build by SHA', async () => {
    const { secret, id } = await createCiToken('alpha-dsp');
    const first = await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: secret, body: { sha: 'a1b2c3d4e5f6', branch: 'main' } });
    expect(first.status).toBe(201);
    expect(first.body).toMatchObject({ sha: 'a1b2c3d4e5f6', branch: 'main', status: 'pending', captureCount: 0 });
    const again = await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: secret, body: { sha: 'a1b2c3d4e5f6', label: 'nightly 41' } });
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ id: first.body.id, branch: 'main', label: 'nightly 41' });

    const list = await api.request('GET', '/api/v1/projects/alpha-dsp/builds?sha=a1b2', { token: secret });
    expect(list.body.total).toBe(1);
    const row = await api.orm.em.fork().findOneOrFail(ApiToken, { id });
    expect(row.lastUsedAt).toBeInstanceOf(Date);
  });

  it('rejects a revoked token with 401', async () => {
    const { secret, id } = await createCiToken('alpha-dsp');
    const revoke = await api.request('DELETE', `/api/projects/alpha-dsp/tokens/${id}`, { token: adminToken });
    expect(revoke.status).toBe(200);
    expect(revoke.body.revokedAt).toBeTruthy();
    const res = await api.request('GET', '/api/v1/projects/alpha-dsp/builds', { token: secret });
    expect(res.status).toBe(401);
    expect(res.body.detail).toMatch(/revoked/);
  });

  it("answers another project's token 404, as if the project did not exist", async () => {
    const { secret } = await createCiToken('beta-dsp');
    const res = await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: secret, body: { sha: 'abcdef1' } });
    expect(res.status).toBe(404);
    expect(res.body.detail).toBe('There is no project alpha-dsp, or you have no access to it.');
  });

  it('rejects a forged secret with a real prefix with 401', async () => {
    const { prefix } = await createCiToken('alpha-dsp');
    const forged = `em_${prefix}_${'A'.repeat(43)}`;
    expect((await api.request('GET', '/api/v1/projects/alpha-dsp/builds', { token: forged })).status).toBe(401);
  });

  it('keeps a read-only token from submitting', async () => {
    const { secret } = await createCiToken('alpha-dsp', ['read-verdicts']);
    const res = await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: secret, body: { sha: 'abcdef2' } });
    expect(res.status).toBe(403);
    expect((await api.request('GET', '/api/v1/projects/alpha-dsp/builds', { token: secret })).status).toBe(200);
  });

  it('validates the build body and names the field', async () => {
    const { secret } = await createCiToken('alpha-dsp');
    const res = await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: secret, body: { sha: 'not a sha!' } });
    expect(res.status).toBe(422);
    expect(res.body.errors[0].path).toBe('body.sha');
  });

  it('writes token creation and revocation to the audit log', async () => {
    const { id, prefix } = await createCiToken('alpha-dsp');
    await api.request('DELETE', `/api/projects/alpha-dsp/tokens/${id}`, { token: adminToken });
    const events = await api.orm.em.fork().find(AuditEvent, { subject: `token:${prefix}` }, { orderBy: { createdAt: 'asc' } });
    expect(events.map((e) => e.action)).toEqual(['token.create', 'token.revoke']);
    const audit = await api.request('GET', '/api/admin/audit?pageSize=5', { token: adminToken });
    expect(audit.body.items[0].action).toBe('token.revoke');
  });
});
