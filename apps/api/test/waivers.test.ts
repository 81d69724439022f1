import { AuditEvent, Build, Capture, Finding, Notification, Target, TestCase, Waiver } from '@earmark/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

/** Waivers over the API: request, four-eyes decisions, the finding's state, mail and audit. */
let api: TestApi;
let engineer: string;
let qa: string;
let admin: string;
const findings: Record<string, string> = {};
const inDays = (d: number) => new Date(Date.now() + d * 86_400_000).toISOString();

beforeAll(async () => {
  api = await startTestApi();
  const em = api.orm.em.fork();
  const project = api.fixture.project.id;
  const testCase = em.create(TestCase, { project, key: 'tone', name: 'Tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 1, frequency: 997 } });
  const target = em.create(Target, { project, key: 'board', name: 'Board' });
  const build = em.create(Build, { project, sha: 'abc1234' });
  const capture = em.create(Capture, {
    project, build, testCase, target, objectKey: 'x.wav', sha256: '0'.repeat(64), sizeBytes: 1, format: { container: 'wav' }, sampleRate: 48000, channelCount: 1, frames: 1,
  });
  for (const checkId of ['thd', 'level', 'latency', 'dc', 'noise']) {
    findings[checkId] = em.create(Finding, { project, capture, checkId, title: `${checkId}: out of bounds` }).id;
  }
  await em.flush();
  [engineer, qa, admin] = (await Promise.all(['engineer', 'qa_manager', 'admin'].map((u) => api.login(`${u}@example.test`)))) as [string, string, string];
});
afterAll(() => api.close());

const requestWaiver = (token: string, check: string, body: Record<string, unknown>) =>
  api.request('POST', `/api/projects/alpha-dsp/findings/${findings[check]}/waivers`, { token, body });
const findingState = async (check: string) => (await api.orm.em.fork().findOneOrFail(Finding, { id: findings[check]! })).state;

describe('waivers', () => {
  it('lets an engineer ask for a waiver of a finding’s check until a future date, and mails the QA managers', async () => {
    const past = await requestWaiver(engineer, 'thd', { reason: 'known', until: '2001-01-01' });
    expect(past.status).toBe(422);
    expect(past.body.errors[0].path).toBe('body.until');
    expect((await requestWaiver(engineer, 'thd', { until: inDays(30) })).status).toBe(422); // a reason is required
    expect((await api.request('POST', '/api/projects/alpha-dsp/findings/00000000-0000-4000-8000-000000000009/waivers', { token: engineer, body: { reason: 'x', until: inDays(3) } })).status).toBe(404);

    const res = await requestWaiver(engineer, 'thd', { reason: 'Codec erratum 14; fixed in silicon rev C.', until: inDays(30) });
    expect(res.status, res.text).toBe(201);
    expect(res.body).toMatchObject({
      project: 'alpha-dsp', testCase: 'tone', target: null, checkId: 'thd', state: 'requested', active: false,
      requestedBy: 'engineer@example.test', decidedBy: null, findingId: findings.thd,
    });
    // A bare date runs to the end of that day (UTC).
    const dated = await requestWaiver(engineer, 'noise', { reason: 'lab mains hum', until: inDays(10).slice(0, 10), targetOnly: true });
    expect(dated.body.until).toBe(`${inDays(10).slice(0, 10)}T23:59:59.999Z`);
    expect(dated.body.target).toBe('board');

    // One pending waiver per finding: the refusal says in words which one exists, and names it for a link (no id in the text).
    const second = await requestWaiver(engineer, 'thd', { reason: 'again', until: inDays(5) });
    expect(second.status).toBe(409);
    expect(second.body.detail).toBe(
      `The thd check of this finding already has a waiver awaiting a QA manager’s decision: requested by engineer@example.test on ${new Date().toISOString().slice(0, 10)}, to run until ${inDays(30).slice(0, 10)}. Follow that one instead of requesting another.`,
    );
    expect(second.body.detail).not.toMatch(/[0-9a-f]{8}-[0-9a-f]{4}-/);
    expect(second.body).toMatchObject({ code: 'waiver-exists', existing: { kind: 'waiver', id: res.body.id, state: 'requested' } });

    const mail = await api.orm.em.fork().find(Notification, { kind: 'waiver-requested' }, { orderBy: { createdAt: 'asc' } });
    expect(mail.map((n) => n.recipient)).toEqual(['qa_manager@example.test', 'qa_manager@example.test']);
    expect(mail[0]!.subject).toContain('waiver requested for tone / thd');
    expect(mail[0]!.body).toContain('Codec erratum 14');
    expect(mail[0]!.payload).toMatchObject({ waiverId: res.body.id, findingId: findings.thd });
  });

  it('lets a QA manager approve it; the finding becomes an accepted deviation, the requester hears back, the trail records it', async () => {
    const list = await api.request('GET', '/api/projects/alpha-dsp/waivers?state=requested', { token: qa });
    const waiver = list.body.items.find((w: { checkId: string }) => w.checkId === 'thd');
    expect(waiver).toBeDefined();
    const approved = await api.request('POST', `/api/projects/alpha-dsp/waivers/${waiver.id}/approve`, { token: qa, body: { comment: 'Until rev C ships.' } });
    expect(approved.status, approved.text).toBe(200);
    expect(approved.body).toMatchObject({ state: 'approved', active: true, decidedBy: 'qa_manager@example.test', decisionComment: 'Until rev C ships.' });
    expect(await findingState('thd')).toBe('accepted_deviation');
    expect((await api.request('POST', `/api/projects/alpha-dsp/waivers/${waiver.id}/approve`, { token: admin })).status).toBe(409);

    const active = await api.request('GET', '/api/projects/alpha-dsp/waivers?state=active', { token: engineer });
    expect(active.body.items.map((w: { id: string }) => w.id)).toEqual([waiver.id]);

    const told = await api.orm.em.fork().find(Notification, { kind: 'waiver-approved' });
    expect(told.map((n) => n.recipient)).toEqual(['engineer@example.test']);

    const trail = await api.request('GET', `/api/projects/alpha-dsp/audit?entity=waiver:${waiver.id}`, { token: qa });
    expect(trail.body.items.map((e: { action: string; actor: string; fromState: string | null; toState: string; comment: string | null }) => [e.action, e.actor, e.fromState, e.toState, e.comment]).reverse()).toEqual([
      ['waiver.request', 'user:engineer@example.test', null, 'requested', null],
      ['waiver.approve', 'user:qa_manager@example.test', 'requested', 'approved', 'Until rev C ships.'],
    ]);
    const finding = await api.request('GET', `/api/projects/alpha-dsp/audit?entity=finding:${findings.thd}`, { token: qa });
    expect(finding.body.items[0]).toMatchObject({ action: 'finding.waive', fromState: 'open', toState: 'accepted_deviation' });
  });

  it('never lets the requester decide their own waiver', async () => {
    const own = await requestWaiver(qa, 'level', { reason: 'measured on the old rig', until: inDays(7) });
    expect(own.status).toBe(201);
    const approve = await api.request('POST', `/api/projects/alpha-dsp/waivers/${own.body.id}/approve`, { token: qa });
    expect(approve.status).toBe(403);
    expect(approve.body.detail).toBe('A waiver must be approved by someone who neither requested nor edited it: qa_manager@example.test requested it. Someone else must decide it.');
    const reject = await api.request('POST', `/api/projects/alpha-dsp/waivers/${own.body.id}/reject`, { token: qa, body: { comment: 'mine' } });
    expect(reject.status).toBe(403);
    expect(reject.body.detail).toMatch(/rejected by someone who neither requested nor edited it: qa_manager@example\.test requested it/);
    expect((await api.request('POST', `/api/projects/alpha-dsp/waivers/${own.body.id}/approve`, { token: engineer })).status).toBe(403); // engineers never decide
    expect(await findingState('level')).toBe('open');
    expect((await api.request('POST', `/api/projects/alpha-dsp/waivers/${own.body.id}/approve`, { token: admin })).status).toBe(200);
  });

  it('rejects only with a comment, leaving the finding open', async () => {
    const res = await requestWaiver(engineer, 'latency', { reason: 'the rig adds 2 ms', until: inDays(14) });
    const url = `/api/projects/alpha-dsp/waivers/${res.body.id}/reject`;
    expect((await api.request('POST', url, { token: qa, body: {} })).status).toBe(422);
    const rejected = await api.request('POST', url, { token: qa, body: { comment: 'Measure the rig and correct for it instead.' } });
    expect(rejected.status).toBe(200);
    expect(rejected.body).toMatchObject({ state: 'rejected', active: false, decisionComment: 'Measure the rig and correct for it instead.' });
    expect(await findingState('latency')).toBe('open');
    expect((await api.request('GET', '/api/projects/alpha-dsp/waivers?state=rejected', { token: engineer })).body.items).toHaveLength(1);
    // After a rejection a new request is allowed.
    expect((await requestWaiver(engineer, 'latency', { reason: 'corrected rig, still 0.5 ms over', until: inDays(14) })).status).toBe(201);
  });

  it('refuses to approve a waiver whose date passed while it waited', async () => {
    const res = await requestWaiver(engineer, 'dc', { reason: 'DC blocker missing on rev A', until: inDays(1) });
    const em = api.orm.em.fork();
    const w = await em.findOneOrFail(Waiver, { id: res.body.id });
    w.expiresAt = new Date(Date.now() - 1000);
    await em.flush();
    const late = await api.request('POST', `/api/projects/alpha-dsp/waivers/${res.body.id}/approve`, { token: qa });
    expect(late.status).toBe(409);
    expect(late.body.detail).toMatch(/has passed/);
    expect((await api.request('POST', '/api/projects/alpha-dsp/waivers/not-a-uuid/approve', { token: qa })).status).toBe(404);
    expect(await api.orm.em.fork().count(AuditEvent, { action: 'waiver.approve', subject: `waiver:${res.body.id}` })).toBe(0);
  });

  it('mails the requester and the finding’s assignee when a QA manager revokes an approved waiver, with the reason', async () => {
    const em = api.orm.em.fork();
    const waiver = await em.findOneOrFail(Waiver, { finding: findings.thd!, state: 'approved' });
    const finding = await em.findOneOrFail(Finding, { id: findings.thd! });
    finding.assignee = api.fixture.users.viewer;
    await em.flush();
    const url = `/api/projects/alpha-dsp/waivers/${waiver.id}/revoke`;
    const revokedMail = () => api.orm.em.fork().find(Notification, { kind: 'waiver-revoked' }, { orderBy: { recipient: 'asc' } });

    expect((await api.request('POST', url, { token: qa, body: { reason: '  ' } })).status).toBe(422); // a reason is required
    expect(await revokedMail()).toHaveLength(0);

    const revoked = await api.request('POST', url, { token: qa, body: { reason: 'Rev C silicon is in; the erratum no longer applies.' } });
    expect(revoked.status, revoked.text).toBe(200);
    expect(revoked.body).toMatchObject({ id: waiver.id, state: 'revoked', active: false });
    expect(await findingState('thd')).toBe('open');

    const mail = await revokedMail();
    expect(mail.map((n) => [n.recipient, n.subject])).toEqual([
      ['engineer@example.test', '[Earmark] alpha-dsp: waiver for tone / thd on every target revoked by qa_manager'],
      ['viewer@example.test', '[Earmark] alpha-dsp: waiver for tone / thd on every target revoked by qa_manager'],
    ]);
    expect(mail[0]!.body).toContain('Reason: Rev C silicon is in; the erratum no longer applies.');
    expect(mail[0]!.body).toContain('the check fails builds again');
    expect(mail[0]!.body).toContain('You get this because you requested the waiver in Earmark.');
    expect(mail[1]!.body).toContain('You get this because you are assigned the finding in Earmark.');
    expect(mail[0]!.payload).toEqual({ project: 'alpha-dsp', waiverId: waiver.id, revokedBy: 'qa_manager@example.test' });

    // Revoked once: a second revocation is refused and mails nobody.
    expect((await api.request('POST', url, { token: qa, body: { reason: 'again' } })).status).toBe(409);
    expect(await revokedMail()).toHaveLength(2);
  });
});

describe('accepted deviation only through a waiver', () => {
  it('answers 422 when an engineer sets a finding to accepted_deviation directly, alone or in bulk, and changes nothing', async () => {
    const em = api.orm.em.fork();
    const capture = await em.findOneOrFail(Capture, { build: { sha: 'abc1234' } });
    const finding = em.create(Finding, { project: api.fixture.project.id, capture, checkId: 'hum', title: 'hum: 50 Hz line over the floor' });
    await em.flush();

    const single = await api.request('PATCH', `/api/projects/alpha-dsp/findings/${finding.id}`, { token: engineer, body: { state: 'accepted_deviation' } });
    expect(single.status, single.text).toBe(422);
    expect(single.contentType).toContain('application/problem+json');
    expect(single.body.detail).toMatch(/waiver/i);
    expect(single.body.errors[0]).toMatchObject({ path: 'body.state' });

    const bulk = await api.request('POST', '/api/projects/alpha-dsp/findings/bulk', { token: qa, body: { ids: [finding.id, findings.latency], state: 'accepted_deviation' } });
    expect(bulk.status, bulk.text).toBe(422);
    expect(bulk.body.detail).toMatch(/waiver/i);

    const after = await api.orm.em.fork().find(Finding, { id: { $in: [finding.id, findings.latency!] } });
    expect(after.map((f) => f.state)).toEqual(['open', 'open']);
    expect(await api.orm.em.fork().count(AuditEvent, { action: 'finding.update', subject: `finding:${finding.id}` })).toBe(0);

    // Other triage moves still work.
    const investigating = await api.request('PATCH', `/api/projects/alpha-dsp/findings/${finding.id}`, { token: engineer, body: { state: 'investigating' } });
    expect(investigating.status, investigating.text).toBe(200);
    expect(investigating.body.state).toBe('investigating');
  });
});
