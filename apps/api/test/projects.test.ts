import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

let api: TestApi;
beforeAll(async () => {
  api = await startTestApi();
});
afterAll(() => api.close());

describe('projects', () => {
  it('lists only the projects a member belongs to, with their role', async () => {
    const res = await api.request('GET', '/api/projects', { token: await api.login('viewer@example.test') });
    expect(res.status).toBe(200);
    expect(res.body.items.map((p: { key: string; myRole: string }) => [p.key, p.myRole])).toEqual([['alpha-dsp', 'viewer']]);
  });

  it('lists every project for an admin', async () => {
    const res = await api.request('GET', '/api/projects', { token: await api.login('admin@example.test') });
    expect(res.body.items.map((p: { key: string }) => p.key)).toEqual(['alpha-dsp', 'beta-dsp']);
  });

  it('counts builds per project', async () => {
    const admin = await api.login('admin@example.test');
    await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: admin, body: { sha: '0123abc' } });
    await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: admin, body: { sha: '0123abd' } });
    const res = await api.request('GET', '/api/projects/alpha-dsp', { token: await api.login('engineer@example.test') });
    expect(res.body).toMatchObject({ key: 'alpha-dsp', myRole: 'engineer', buildCount: 2, targetCount: 0 });
  });

  it('creates a project (admin) and refuses a duplicate key with 409', async () => {
    const admin = await api.login('admin@example.test');
    const created = await api.request('POST', '/api/projects', { token: admin, body: { key: 'gamma-amp', name: 'Gamma Amp' } });
    expect(created.status).toBe(201);
    const dup = await api.request('POST', '/api/projects', { token: admin, body: { key: 'gamma-amp', name: 'Again' } });
    expect(dup.status).toBe(409);
    const bad = await api.request('POST', '/api/projects', { token: admin, body: { key: 'Bad Key', name: 'x' } });
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0].path).toBe('body.key');
  });

  it('lets an admin grant a role, which the member then sees', async () => {
    const admin = await api.login('admin@example.test');
    const res = await api.request('PUT', '/api/projects/alpha-dsp/members', { token: admin, body: { email: 'outsider@example.test', role: 'viewer' } });
    expect(res.status).toBe(200);
    const mine = await api.request('GET', '/api/projects', { token: await api.login('outsider@example.test') });
    expect(mine.body.items.map((p: { key: string }) => p.key)).toEqual(['alpha-dsp', 'beta-dsp']);
  });
});
