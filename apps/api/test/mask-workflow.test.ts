import { MaskRevision, Membership, Notification, Target, TestCase, User, hashPassword, testCaseSettings, TEST_PASSWORD } from '@earmark/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

/** The review workflow of mask revisions: transitions, four eyes, diff, history, audit, mail. */
let api: TestApi;
let engineer: string;
let qa: string;
let qa2: string;
let admin: string;

const envelope = {
  id: 'response',
  kind: 'magnitude-envelope',
  measure: 'transfer',
  upper: [{ hz: 100, db: 1 }, { hz: 1000, db: 1 }, { hz: 10000, db: 1 }],
  lower: [{ hz: 100, db: -1 }, { hz: 10000, db: -1 }],
};
const level = { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20, max: -10 };
const clipping = { id: 'clipping', kind: 'integrity', metric: 'clipped-samples', max: 0 };
const base = '/api/projects/alpha-dsp/test-cases/tone/masks';

beforeAll(async () => {
  api = await startTestApi();
  const em = api.orm.em.fork();
  em.create(TestCase, { project: api.fixture.project.id, key: 'tone', name: 'Tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 1, frequency: 997 } });
  em.create(Target, { project: api.fixture.project.id, key: 'board', name: 'Board' });
  // A second QA manager, so that a QA manager's own revision can still be decided.
  const second = em.create(User, { email: 'qa2@example.test', displayName: 'Second QA', passwordHash: await hashPassword(TEST_PASSWORD, 4) });
  em.create(Membership, { project: api.fixture.project.id, user: second, role: 'qa_manager' });
  await em.flush();
  [engineer, qa, qa2, admin] = (await Promise.all(['engineer', 'qa_manager', 'qa2', 'admin'].map((u) => api.login(`${u}@example.test`)))) as [string, string, string, string];
});
afterAll(() => api.close());

const mail = (kind: string) =>
  api.orm.em.fork().find(Notification, { kind }, { orderBy: { createdAt: 'asc' } });

async function draft(token: string, checks: unknown[], extra: Record<string, unknown> = {}): Promise<number> {
  const res = await api.request('POST', base, { token, body: { checks, ...extra } });
  expect(res.status, res.text).toBe(201);
  return res.body.revision as number;
}

async function history(revision: number) {
  const res = await api.request('GET', `${base}/${revision}/history`, { token: engineer });
  expect(res.status, res.text).toBe(200);
  return res.body.items as { action: string; actor: string; fromState: string | null; toState: string | null; comment: string | null }[];
}

describe('revision transitions', () => {
  it('draft → edited → in review → approved, immutable after submission, with the trail of every step', async () => {
    const rev = await draft(engineer, [level]);
    const edited = await api.request('PATCH', `${base}/${rev}`, { token: engineer, body: { checks: [level, clipping], note: 'adds a clipping check', target: 'board' } });
    expect(edited.status, edited.text).toBe(200);
    expect(edited.body).toMatchObject({ state: 'draft', note: 'adds a clipping check', target: 'board', submittedAt: null, basedOn: null });
    expect(edited.body.checks.map((c: { id: string }) => c.id)).toEqual(['level', 'clipping']);
    const bad = await api.request('PATCH', `${base}/${rev}`, { token: engineer, body: { checks: [level, level] } });
    expect(bad.status).toBe(422);

    const submitted = await api.request('POST', `${base}/${rev}/submit`, { token: engineer });
    expect(submitted.status, submitted.text).toBe(200);
    expect(submitted.body.state).toBe('in_review');
    expect(Date.parse(submitted.body.submittedAt)).toBeGreaterThan(Date.now() - 60_000);

    // Submitted means frozen: no edits, no second submission.
    const frozen = await api.request('PATCH', `${base}/${rev}`, { token: engineer, body: { note: 'sneaky' } });
    expect(frozen.status).toBe(409);
    expect(frozen.body.detail).toMatch(/in review.*copy it to a new draft/);
    expect((await api.request('POST', `${base}/${rev}/submit`, { token: engineer })).status).toBe(409);

    const approved = await api.request('POST', `${base}/${rev}/approve`, { token: qa, body: { comment: 'Looks right on the bench.' } });
    expect(approved.status, approved.text).toBe(200);
    expect(approved.body).toMatchObject({ state: 'approved', reviewer: 'qa_manager@example.test', decisionComment: 'Looks right on the bench.' });
    expect((await api.request('PATCH', `${base}/${rev}`, { token: engineer, body: { note: 'x' } })).status).toBe(409);

    expect(await history(rev)).toMatchObject([
      { action: 'mask.draft', actor: 'user:engineer@example.test', fromState: null, toState: 'draft', comment: null },
      { action: 'mask.edit', actor: 'user:engineer@example.test', fromState: 'draft', toState: 'draft' },
      { action: 'mask.submit', actor: 'user:engineer@example.test', fromState: 'draft', toState: 'in_review', comment: null },
      { action: 'mask.approve', actor: 'user:qa_manager@example.test', fromState: 'in_review', toState: 'approved', comment: 'Looks right on the bench.' },
    ]);
    const one = await api.request('GET', `${base}/${rev}`, { token: engineer });
    expect(one.body).toMatchObject({ revision: rev, state: 'approved' });
  });

  it('mails every QA manager of the project (through the outbox) when a revision enters review, and wakes the sender', async () => {
    const rev = await draft(engineer, [level]);
    const before = (await mail('mask-review')).length;
    await api.request('POST', `${base}/${rev}/submit`, { token: engineer });
    const rows = (await mail('mask-review')).slice(before);
    expect(rows.map((n) => n.recipient).sort()).toEqual(['qa2@example.test', 'qa_manager@example.test']);
    expect(rows[0]).toMatchObject({ state: 'pending', payload: { project: 'alpha-dsp', testCase: 'tone', revision: rev } });
    expect(rows[0]!.subject).toContain(`tone revision ${rev} awaits review`);
    expect(rows[0]!.body).toContain('/projects/alpha-dsp/test-cases/tone/masks');
    const jobs = await api.orm.em.fork().getConnection().execute<{ n: string }[]>(`select count(*) as n from pgboss.job where name = 'send-notifications'`);
    expect(Number(jobs[0]!.n)).toBeGreaterThan(0);
  });

  it('rejects a revision in review only with a comment, and a rejected revision stays rejected', async () => {
    const rev = await draft(engineer, [level]);
    expect((await api.request('POST', `${base}/${rev}/reject`, { token: qa, body: { comment: 'not yet' } })).status).toBe(409); // drafts are not in review
    await api.request('POST', `${base}/${rev}/submit`, { token: engineer });
    const bare = await api.request('POST', `${base}/${rev}/reject`, { token: qa, body: {} });
    expect(bare.status).toBe(422);
    expect(bare.body.errors[0].path).toBe('body.comment');
    expect((await api.request('POST', `${base}/${rev}/reject`, { token: qa, body: { comment: '   ' } })).status).toBe(422);

    const rejected = await api.request('POST', `${base}/${rev}/reject`, { token: qa, body: { comment: 'The lower limit is too loose below 200 Hz.' } });
    expect(rejected.status, rejected.text).toBe(200);
    expect(rejected.body).toMatchObject({ state: 'rejected', reviewer: 'qa_manager@example.test', decisionComment: 'The lower limit is too loose below 200 Hz.' });
    expect(rejected.body.decidedAt).not.toBeNull();
    expect((await api.request('POST', `${base}/${rev}/approve`, { token: qa })).status).toBe(409);
    expect((await history(rev)).at(-1)).toMatchObject({
      action: 'mask.reject',
      actor: 'user:qa_manager@example.test',
      fromState: 'in_review',
      toState: 'rejected',
      comment: 'The lower limit is too loose below 200 Hz.',
    });
  });

  it('lists the revisions waiting for review across the project', async () => {
    const res = await api.request('GET', '/api/projects/alpha-dsp/masks?state=in_review', { token: qa });
    expect(res.status).toBe(200);
    expect(res.body.items.length).toBeGreaterThan(0);
    expect(res.body.items.every((m: { state: string; testCase: string }) => m.state === 'in_review' && m.testCase === 'tone')).toBe(true);
    expect((await api.request('GET', '/api/projects/alpha-dsp/masks?state=bogus', { token: qa })).status).toBe(422);
  });
});

describe('four eyes', () => {
  it('never lets the author approve or reject their own revision, whoever they are', async () => {
    const rev = await draft(qa, [level]);
    const before = (await mail('mask-review')).length;
    await api.request('POST', `${base}/${rev}/submit`, { token: qa });
    // The author is not asked to review their own work.
    expect((await mail('mask-review')).slice(before).map((n) => n.recipient)).toEqual(['qa2@example.test']);

    const approve = await api.request('POST', `${base}/${rev}/approve`, { token: qa });
    expect(approve.status).toBe(403);
    expect(approve.body.detail).toBe(`A mask revision must be approved by someone who neither wrote nor edited it: qa_manager@example.test wrote revision ${rev}. Someone else must review it.`);
    const reject = await api.request('POST', `${base}/${rev}/reject`, { token: qa, body: { comment: 'my own' } });
    expect(reject.status).toBe(403);
    expect(reject.body.detail).toMatch(/rejected by someone who neither wrote nor edited it: qa_manager@example\.test wrote/);
    const adminOwn = await draft(admin, [level]);
    await api.request('POST', `${base}/${adminOwn}/submit`, { token: admin });
    expect((await api.request('POST', `${base}/${adminOwn}/approve`, { token: admin })).status).toBe(403);

    const other = await api.request('POST', `${base}/${rev}/reject`, { token: qa2, body: { comment: 'Second pair of eyes says no.' } });
    expect(other.status).toBe(200);
    expect(other.body.reviewer).toBe('qa2@example.test');
  });
});

describe('copy and diff', () => {
  it('copies any revision to a new draft, then diffs it check by check', async () => {
    const source = await draft(engineer, [envelope, level, clipping], { note: 'baseline' });
    await api.request('POST', `${base}/${source}/submit`, { token: engineer });
    await api.request('POST', `${base}/${source}/approve`, { token: qa });

    const copy = await api.request('POST', `${base}/${source}/copy`, { token: engineer, body: {} });
    expect(copy.status, copy.text).toBe(201);
    expect(copy.body).toMatchObject({ state: 'draft', basedOn: source, note: 'Copy of revision ' + source + ': baseline', target: null, author: 'engineer@example.test' });
    expect(copy.body.checks).toEqual((await api.request('GET', `${base}/${source}`, { token: engineer })).body.checks);
    const rev = copy.body.revision as number;

    // Move one limit point, drop the clipping check, add a DC check, keep the level check.
    const moved = { ...envelope, upper: [{ hz: 100, db: 1 }, { hz: 1000, db: 1.5 }, { hz: 10000, db: 1 }] };
    const dc = { id: 'dc', kind: 'integrity', metric: 'dc-offset', max: 0.001 };
    expect((await api.request('PATCH', `${base}/${rev}`, { token: engineer, body: { checks: [moved, level, dc] } })).status).toBe(200);

    const diff = await api.request('GET', `${base}/${rev}/diff`, { token: engineer });
    expect(diff.status, diff.text).toBe(200);
    expect(diff.body.base).toMatchObject({ revision: source, state: 'approved' });
    expect(diff.body.head).toMatchObject({ revision: rev, state: 'draft' });
    expect(diff.body.summary).toEqual({ added: 1, removed: 1, changed: 1, unchanged: 1 });
    const byId = Object.fromEntries(diff.body.checks.map((c: { id: string }) => [c.id, c]));
    expect(byId.response).toMatchObject({ status: 'changed', changes: [{ path: 'upper.1.db', before: 1, after: 1.5 }] });
    expect(byId.level).toMatchObject({ status: 'unchanged', changes: [] });
    expect(byId.dc).toMatchObject({ status: 'added', before: null, after: dc });
    expect(byId.clipping).toMatchObject({ status: 'removed', after: null });
    expect(diff.body.noteChanged).toBe(true);
    expect(diff.body.targetChanged).toBe(false);

    // An explicit base, and a point added to a limit curve.
    const grown = { ...moved, lower: [{ hz: 100, db: -1 }, { hz: 10000, db: -1 }, { hz: 16000, db: -3 }] };
    await api.request('PATCH', `${base}/${rev}`, { token: engineer, body: { checks: [grown, level, dc] } });
    const explicit = await api.request('GET', `${base}/${rev}/diff?base=${source}`, { token: engineer });
    expect(explicit.body.checks.find((c: { id: string }) => c.id === 'response').changes).toEqual([
      { path: 'upper.1.db', before: 1, after: 1.5 },
      { path: 'lower.2', before: null, after: { hz: 16000, db: -3 } },
    ]);
    expect((await api.request('GET', `${base}/${rev}/diff?base=999`, { token: engineer })).status).toBe(404);
    expect((await api.request('GET', `${base}/1/diff`, { token: engineer })).status).toBe(404); // nothing before the first

    expect((await history(rev))[0]).toMatchObject({ action: 'mask.copy', fromState: null, toState: 'draft' });

    // Approving the copy supersedes its source, and the source's trail says so.
    await api.request('POST', `${base}/${rev}/submit`, { token: engineer });
    expect((await api.request('POST', `${base}/${rev}/approve`, { token: qa2 })).status).toBe(200);
    expect((await api.request('GET', `${base}/${source}`, { token: engineer })).body.state).toBe('superseded');
    expect((await history(source)).at(-1)).toMatchObject({ action: 'mask.supersede', actor: 'user:qa2@example.test', fromState: 'approved', toState: 'superseded' });

    // A superseded revision can still be copied.
    const again = await api.request('POST', `${base}/${source}/copy`, { token: engineer, body: { note: 'back to the baseline', target: 'board' } });
    expect(again.body).toMatchObject({ basedOn: source, note: 'back to the baseline', target: 'board' });
  });
});

describe('engine self-test', () => {
  const parseval = { id: 'analysis-energy', kind: 'level', metric: 'energy-parseval', max: 1e-9 };

  it('refuses the self-test in a new draft and in saved checks, naming the check in words', async () => {
    const created = await api.request('POST', base, { token: engineer, body: { checks: [level, parseval] } });
    expect(created.status).toBe(422);
    expect(created.body.code).toBe('engine-self-test-in-mask');
    expect(created.body.detail).toMatch(/^Check “analysis-energy” is the engine self-test \(energy agreement\): it checks the analysis, not the firmware/);
    expect(created.body.errors).toEqual([{ path: 'body.checks.1.metric', message: expect.stringMatching(/cannot be part of an acceptance mask/) }]);

    const rev = await draft(engineer, [level]);
    const edited = await api.request('PATCH', `${base}/${rev}`, { token: engineer, body: { checks: [parseval, level] } });
    expect(edited.status).toBe(422);
    expect(edited.body.errors[0].path).toBe('body.checks.0.metric');
    expect((await api.request('GET', `${base}/${rev}`, { token: engineer })).body.checks).toEqual([level]);
  });

  it('keeps a stored revision that holds it, and copies it without the self-test, saying so in the note', async () => {
    // Stored before the rule (written straight to the database, as a migration-era revision would be).
    const em = api.orm.em.fork();
    const testCase = await em.findOneOrFail(TestCase, { key: 'tone' });
    const last = await em.findOne(MaskRevision, { testCase }, { orderBy: { revision: 'desc' } });
    const engineerUser = await em.findOneOrFail(User, { email: 'engineer@example.test' });
    const old = em.create(MaskRevision, { testCase, revision: (last?.revision ?? 0) + 1, state: 'rejected', checks: [level, parseval], settings: testCaseSettings(testCase), author: engineerUser, note: 'legacy' });
    await em.flush();
    const stored = await api.request('GET', `${base}/${old.revision}`, { token: engineer });
    expect(stored.status).toBe(200);
    expect(stored.body.checks.map((c: { id: string }) => c.id)).toEqual(['level', 'analysis-energy']);

    const copy = await api.request('POST', `${base}/${old.revision}/copy`, { token: engineer, body: {} });
    expect(copy.status, copy.text).toBe(201);
    expect(copy.body.checks).toEqual([level]);
    expect(copy.body.note).toBe(`Copy of revision ${old.revision}: legacy (left out the engine self-test “analysis-energy”: not an acceptance check)`);
  });
});

describe('project audit log', () => {
  it('shows QA managers and admins the transitions, filtered by actor, action and entity, paged', async () => {
    const all = await api.request('GET', '/api/projects/alpha-dsp/audit?pageSize=5', { token: qa });
    expect(all.status).toBe(200);
    expect(all.body.items).toHaveLength(5);
    expect(all.body.total).toBeGreaterThan(10);
    const page2 = await api.request('GET', '/api/projects/alpha-dsp/audit?pageSize=5&page=2', { token: qa });
    expect(page2.body.items[0].id).not.toBe(all.body.items[0].id);

    const rejects = await api.request('GET', '/api/projects/alpha-dsp/audit?action=mask.reject', { token: admin });
    expect(rejects.body.items.length).toBe(2);
    expect(rejects.body.items.map((e: { actor: string }) => e.actor).sort()).toEqual(['user:qa2@example.test', 'user:qa_manager@example.test']);
    expect(rejects.body.items[0]).toMatchObject({ fromState: 'in_review', toState: 'rejected' });
    expect(rejects.body.items[0].subject).toMatch(/^mask:tone#\d+$/);

    const byQa2 = await api.request('GET', '/api/projects/alpha-dsp/audit?actor=user:qa2@example.test&action=mask.', { token: qa });
    expect(byQa2.body.items.map((e: { action: string }) => e.action).sort()).toEqual(['mask.approve', 'mask.reject', 'mask.supersede']);

    const masks = await api.request('GET', '/api/projects/alpha-dsp/audit?entity=mask&pageSize=200', { token: qa });
    expect(masks.body.items.every((e: { subject: string }) => e.subject.startsWith('mask:'))).toBe(true);
    const one = await api.request('GET', '/api/projects/alpha-dsp/audit?entity=mask:tone%231', { token: qa });
    expect(one.body.items.map((e: { action: string }) => e.action).reverse()).toEqual(['mask.draft', 'mask.edit', 'mask.submit', 'mask.approve']); // revision 1 is for target board: nothing superseded it
    // Each project sees only its own log.
    const otherProject = await api.request('GET', '/api/projects/beta-dsp/audit', { token: admin });
    expect(otherProject.body.total).toBe(0);
  });
});
