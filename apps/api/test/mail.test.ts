import { Membership, Notification, TestCase, User } from '@earmark/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

/** Mail the API writes to the outbox: decisions reach their author, and the per-member build-mail setting. */
let api: TestApi;
let engineer: string;
let qa: string;
let viewer: string;
let admin: string;

const level = { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20, max: -10 };
const base = '/api/projects/alpha-dsp/test-cases/hum.idle/masks';

beforeAll(async () => {
  api = await startTestApi();
  const em = api.orm.em.fork();
  em.create(TestCase, { project: api.fixture.project.id, key: 'hum.idle', name: 'Idle hum', stimulus: { kind: 'silence', sampleRate: 48000, seconds: 1 } });
  await em.flush();
  [engineer, qa, viewer, admin] = (await Promise.all(['engineer', 'qa_manager', 'viewer', 'admin'].map((u) => api.login(`${u}@example.test`)))) as [string, string, string, string];
});
afterAll(() => api.close());

const mail = (kind: string) => api.orm.em.fork().find(Notification, { kind }, { orderBy: { createdAt: 'asc' } });

async function draft(): Promise<number> {
  const res = await api.request('POST', base, { token: engineer, body: { checks: [level], note: 'idle <hum> & hiss' } });
  expect(res.status, res.text).toBe(201);
  return res.body.revision as number;
}

describe('mask decision mail', () => {
  it('tells the author that their revision was approved, with the reviewer and the comment', async () => {
    const rev = await draft();
    expect((await api.request('POST', `${base}/${rev}/submit`, { token: engineer })).status).toBe(200);
    const approved = await api.request('POST', `${base}/${rev}/approve`, { token: qa, body: { comment: 'Matches the <bench> run.' } });
    expect(approved.status, approved.text).toBe(200);

    const rows = await mail('mask-approved');
    expect(rows.map((n) => n.recipient)).toEqual(['engineer@example.test']);
    const [n] = rows;
    expect(n!.subject).toBe(`[Earmark] alpha-dsp: mask hum.idle revision ${rev} was approved`);
    expect(n!.body).toContain(`qa_manager (qa_manager@example.test) approved revision ${rev} of the tolerance mask for hum.idle`);
    expect(n!.body).toContain('Comment: Matches the <bench> run.');
    expect(n!.body).toContain('/projects/alpha-dsp/test-cases/hum.idle/masks');
    expect(n!.body).toContain(`You get this because you wrote revision ${rev}`);
    expect(n!.html).toContain('Matches the &lt;bench&gt; run.');
    expect(n!.payload).toMatchObject({ project: 'alpha-dsp', testCase: 'hum.idle', revision: rev, decision: 'approved' });
  });

  it('tells the author that their revision was rejected, with the reason', async () => {
    const rev = await draft();
    expect((await api.request('POST', `${base}/${rev}/submit`, { token: engineer })).status).toBe(200);
    const rejected = await api.request('POST', `${base}/${rev}/reject`, { token: qa, body: { comment: 'The lower limit is too loose.' } });
    expect(rejected.status, rejected.text).toBe(200);

    const rows = await mail('mask-rejected');
    expect(rows.map((n) => n.recipient)).toEqual(['engineer@example.test']);
    expect(rows[0]!.subject).toBe(`[Earmark] alpha-dsp: mask hum.idle revision ${rev} was rejected`);
    expect(rows[0]!.body).toContain('Comment: The lower limit is too loose.');
    expect(rows[0]!.body).toContain('copy it to a new draft');
  });

  it('writes no decision mail to a disabled author', async () => {
    const rev = await draft();
    expect((await api.request('POST', `${base}/${rev}/submit`, { token: engineer })).status).toBe(200);
    const em = api.orm.em.fork();
    const author = await em.findOneOrFail(User, { email: 'engineer@example.test' });
    author.disabled = true;
    await em.flush();
    try {
      const before = (await mail('mask-approved')).length;
      expect((await api.request('POST', `${base}/${rev}/approve`, { token: qa, body: {} })).status).toBe(200);
      expect(await mail('mask-approved')).toHaveLength(before);
    } finally {
      author.disabled = false;
      await em.flush();
    }
  });
});

describe('build-mail subscription', () => {
  const path = '/api/projects/alpha-dsp/subscription';

  it('is on for engineers and QA managers and off for viewers by default', async () => {
    expect((await api.request('GET', path, { token: engineer })).body).toEqual({ buildFailures: true });
    expect((await api.request('GET', path, { token: qa })).body).toEqual({ buildFailures: true });
    expect((await api.request('GET', path, { token: viewer })).body).toEqual({ buildFailures: false });
  });

  it('lets a viewer opt in and an engineer opt out, each for themselves only', async () => {
    const on = await api.request('PUT', path, { token: viewer, body: { buildFailures: true } });
    expect(on.status, on.text).toBe(200);
    expect(on.body).toEqual({ buildFailures: true });
    const off = await api.request('PUT', path, { token: engineer, body: { buildFailures: false } });
    expect(off.body).toEqual({ buildFailures: false });

    const rows = await api.orm.em.fork().find(Membership, { project: api.fixture.project.id }, { populate: ['user'] });
    const byEmail = Object.fromEntries(rows.map((m) => [m.user.email, m.subscribed]));
    expect(byEmail).toMatchObject({ 'viewer@example.test': true, 'engineer@example.test': false, 'qa_manager@example.test': true });
    expect((await api.request('GET', path, { token: viewer })).body).toEqual({ buildFailures: true });
    await api.request('PUT', path, { token: engineer, body: { buildFailures: true } });
  });

  it('names the field when the body is wrong', async () => {
    const res = await api.request('PUT', path, { token: viewer, body: { buildFailures: 'yes' } });
    expect(res.status).toBe(422);
    expect(res.contentType).toMatch(/problem\+json/);
    expect(res.body.errors.map((e: { path: string }) => e.path)).toEqual(['body.buildFailures']);
  });

  it('answers an admin who is not a member: nothing to receive, nothing to change', async () => {
    expect((await api.request('GET', path, { token: admin })).body).toEqual({ buildFailures: false });
    const res = await api.request('PUT', path, { token: admin, body: { buildFailures: true } });
    expect(res.status).toBe(409);
    expect(res.body.detail).toMatch(/not a member of alpha-dsp/);
  });

  it('follows the role when an admin adds a member or changes their role', async () => {
    const em = api.orm.em.fork();
    em.create(User, { email: 'newcomer@example.test', displayName: 'Newcomer', passwordHash: 'x' });
    await em.flush();
    const subscribed = async () => (await api.orm.em.fork().findOneOrFail(Membership, { user: { email: 'newcomer@example.test' }, project: api.fixture.project.id })).subscribed;
    const setRole = (role: string) => api.request('PUT', '/api/projects/alpha-dsp/members', { token: admin, body: { email: 'newcomer@example.test', role } });
    expect((await setRole('viewer')).status).toBe(200);
    expect(await subscribed()).toBe(false);
    expect((await setRole('engineer')).status).toBe(200);
    expect(await subscribed()).toBe(true);
    expect((await setRole('viewer')).status).toBe(200);
    expect(await subscribed()).toBe(false);
  });
});
