import { Target, TestCase } from '@earmark/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

let api: TestApi;
const checks = [{ id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20, max: -10 }];
beforeAll(async () => {
  api = await startTestApi();
  const em = api.orm.em.fork();
  em.create(TestCase, { project: api.fixture.project.id, key: 'tone', name: 'Tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 1, frequency: 997 } });
  em.create(Target, { project: api.fixture.project.id, key: 'board', name: 'Board' });
  await em.flush();
});
afterAll(() => api.close());

const base = '/api/projects/alpha-dsp/test-cases/tone/masks';

describe('mask revisions', () => {
  it('validates a draft as a mask document and names the failing field', async () => {
    const engineer = await api.login('engineer@example.test');
    const dup = await api.request('POST', base, { token: engineer, body: { checks: [...checks, ...checks] } });
    expect(dup.status).toBe(422);
    expect(dup.body.errors.map((e: { path: string }) => e.path)).toContain('body.checks.1.id');
    const unknownKind = await api.request('POST', base, { token: engineer, body: { checks: [{ id: 'x', kind: 'loudness' }] } });
    expect(unknownKind.status).toBe(422);
    expect(unknownKind.body.detail).toContain('body.checks.0.kind');
  });

  it('lets a QA manager approve an engineer’s revision once its author submitted it, never their own, and supersedes the revision in force', async () => {
    const engineer = await api.login('engineer@example.test');
    const qa = await api.login('qa_manager@example.test');
    const first = await api.request('POST', base, { token: engineer, body: { checks } });
    expect(first.status).toBe(201);
    expect(first.body).toMatchObject({ revision: 1, state: 'draft', author: 'engineer@example.test', target: null });

    // A draft is not approved directly: that would submit it on its author's behalf.
    const early = await api.request('POST', `${base}/1/approve`, { token: qa });
    expect(early.status).toBe(409);
    expect(early.body.detail).toBe('Revision 1 is a draft; its author must submit it for review before it can be approved.');
    expect((await api.request('POST', `${base}/1/submit`, { token: engineer })).status).toBe(200);
    expect((await api.request('POST', `${base}/1/approve`, { token: engineer })).status).toBe(403); // engineers cannot approve
    const approved = await api.request('POST', `${base}/1/approve`, { token: qa });
    expect(approved.status).toBe(200);
    expect(approved.body).toMatchObject({ state: 'approved', reviewer: 'qa_manager@example.test' });

    const own = await api.request('POST', base, { token: qa, body: { checks, note: 'tighter' } });
    expect(own.body.revision).toBe(2);
    expect((await api.request('POST', `${base}/2/submit`, { token: qa })).status).toBe(200);
    const refused = await api.request('POST', `${base}/2/approve`, { token: qa });
    expect(refused.status).toBe(403);
    expect(refused.body.detail).toMatch(/neither wrote nor edited it: qa_manager@example\.test wrote revision 2/);

    const admin = await api.login('admin@example.test');
    expect((await api.request('POST', `${base}/2/approve`, { token: admin })).status).toBe(200);
    const list = await api.request('GET', base, { token: engineer });
    expect(list.body.items.map((m: { revision: number; state: string }) => [m.revision, m.state])).toEqual([
      [2, 'approved'],
      [1, 'superseded'],
    ]);
    expect((await api.request('POST', `${base}/1/approve`, { token: admin })).status).toBe(409);
  });

  it('scopes a revision to one target when asked, and rejects an unknown target', async () => {
    const engineer = await api.login('engineer@example.test');
    const scoped = await api.request('POST', base, { token: engineer, body: { checks, target: 'board' } });
    expect(scoped.status).toBe(201);
    expect(scoped.body.target).toBe('board');
    const unknown = await api.request('POST', base, { token: engineer, body: { checks, target: 'nope' } });
    expect(unknown.status).toBe(422);
  });
});
