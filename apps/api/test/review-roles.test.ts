import { AuditEvent, Build, Capture, Finding, MaskRevision, Membership, Target, TestCase, User, Waiver, hashPassword, testCaseSettings, TEST_PASSWORD } from '@earmark/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi, type TestResponse } from './support/test-api.js';

/**
 * Who may do what in the review workflows of masks and waivers: every role against every
 * step, with the exact status, and the four-eyes rule with no way around it (only the
 * author edits or submits a draft; nobody who wrote or edited a revision, or requested a
 * waiver, decides it).
 */
type Role = 'admin' | 'qa_manager' | 'engineer' | 'viewer' | 'outsider';
const ROLES: Role[] = ['admin', 'qa_manager', 'engineer', 'viewer', 'outsider'];

let api: TestApi;
const tokens = {} as Record<Role | 'colleague', string>;
const ids = {} as Record<Role | 'colleague', string>;
let testCaseId = '';
let captureId = '';

const base = '/api/projects/alpha-dsp/test-cases/tone/masks';
const level = { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20, max: -10 };
const thd = { id: 'thd', kind: 'distortion', metric: 'thd-percent', max: 1 };

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
  // A second engineer: the "someone else" whose drafts and waivers the others act on.
  const colleague = em.create(User, { email: 'colleague@example.test', displayName: 'Colleague', passwordHash: await hashPassword(TEST_PASSWORD, 4) });
  em.create(Membership, { project, user: colleague, role: 'engineer' });
  await em.flush();
  testCaseId = testCase.id;
  captureId = capture.id;
  for (const role of ROLES) ids[role] = api.fixture.users[role].id;
  ids.colleague = colleague.id;
  for (const who of [...ROLES, 'colleague'] as const) tokens[who] = await api.login(`${who}@example.test`);
});
afterAll(() => api.close());

// ---- state the cells act on -------------------------------------------------------------

/** A draft made through the API by someone allowed to draft. */
async function draftBy(who: 'admin' | 'qa_manager' | 'engineer' | 'colleague', checks: unknown[] = [level]): Promise<number> {
  const res = await api.request('POST', base, { token: tokens[who], body: { checks } });
  expect(res.status, res.text).toBe(201);
  return res.body.revision as number;
}

async function submittedBy(who: 'colleague' | 'engineer'): Promise<number> {
  const rev = await draftBy(who);
  const res = await api.request('POST', `${base}/${rev}/submit`, { token: tokens[who] });
  expect(res.status, res.text).toBe(200);
  return rev;
}

/**
 * A revision written straight into the database: drafts by people who can no longer draft
 * here (a viewer who used to be an engineer, someone who left the project), or one whose
 * recorded contributors include someone besides its author (edited before the rule held).
 */
async function storedRevision(author: string, state: 'draft' | 'in_review', contributors: string[] = [author]): Promise<number> {
  const em = api.orm.em.fork();
  const testCase = await em.findOneOrFail(TestCase, { id: testCaseId });
  const last = await em.findOne(MaskRevision, { testCase }, { orderBy: { revision: 'desc' } });
  const revision = (last?.revision ?? 0) + 1;
  em.create(MaskRevision, {
    testCase, revision, state, checks: [level], author, contributors, settings: testCaseSettings(testCase), submittedAt: state === 'in_review' ? new Date() : null,
  });
  await em.flush();
  return revision;
}

async function revisionRow(revision: number) {
  return api.orm.em.fork().findOneOrFail(MaskRevision, { testCase: testCaseId, revision });
}

async function newFinding(): Promise<string> {
  const em = api.orm.em.fork();
  const finding = em.create(Finding, { project: api.fixture.project.id, capture: captureId, checkId: 'thd', title: 'thd: out of bounds' });
  await em.flush();
  return finding.id;
}

/** A requested waiver of a fresh finding, written straight into the database. */
async function storedWaiver(requester: string): Promise<string> {
  const em = api.orm.em.fork();
  const finding = await newFinding();
  const waiver = em.create(Waiver, {
    project: api.fixture.project.id, testCase: testCaseId, target: null, checkId: 'thd', reason: 'codec erratum', expiresAt: new Date(Date.now() + 7 * 86_400_000), requestedBy: requester, finding,
  });
  await em.flush();
  return waiver.id;
}

const waiverState = async (id: string) => (await api.orm.em.fork().findOneOrFail(Waiver, { id })).state;
const inAWeek = () => new Date(Date.now() + 7 * 86_400_000).toISOString();

// ---- the matrix ---------------------------------------------------------------------------

interface Action {
  name: string;
  expected: Record<Role, number>;
  /** Sets up fresh state for one cell, performs the step as `role`, and checks what was (not) stored. */
  run(role: Role): Promise<{ res: TestResponse; stored: (allowed: boolean) => Promise<void> }>;
}

const statusMap = (ok: number, refused: Partial<Record<Role, number>> = {}): Record<Role, number> => ({
  admin: ok, qa_manager: ok, engineer: ok, viewer: 403, outsider: 404, ...refused,
});

const ACTIONS: Action[] = [
  {
    name: 'create a draft',
    expected: statusMap(201),
    async run(role) {
      const res = await api.request('POST', base, { token: tokens[role], body: { checks: [level], note: `by ${role}` } });
      return {
        res,
        stored: async (allowed) => {
          const rows = await api.orm.em.fork().find(MaskRevision, { testCase: testCaseId, note: `by ${role}` }, { populate: ['author'] });
          expect(rows.map((r) => [r.author.email, r.state, r.contributors])).toEqual(allowed ? [[`${role}@example.test`, 'draft', [ids[role]]]] : []);
        },
      };
    },
  },
  {
    name: 'edit their own draft',
    expected: statusMap(200),
    async run(role) {
      const rev = role === 'viewer' || role === 'outsider' ? await storedRevision(ids[role], 'draft') : await draftBy(role);
      const res = await api.request('PATCH', `${base}/${rev}`, { token: tokens[role], body: { checks: [level, thd] } });
      return { res, stored: async (allowed) => expect((await revisionRow(rev)).checks).toHaveLength(allowed ? 2 : 1) };
    },
  },
  {
    name: "edit someone else's draft",
    expected: statusMap(403),
    async run(role) {
      const rev = await draftBy('colleague');
      const res = await api.request('PATCH', `${base}/${rev}`, { token: tokens[role], body: { checks: [{ ...thd, max: 100 }] } });
      return {
        res,
        stored: async () => {
          const row = await revisionRow(rev);
          expect(row.checks).toEqual([level]);
          expect(row.contributors).toEqual([ids.colleague]);
        },
      };
    },
  },
  {
    name: 'submit their own draft',
    expected: statusMap(200),
    async run(role) {
      const rev = role === 'viewer' || role === 'outsider' ? await storedRevision(ids[role], 'draft') : await draftBy(role);
      const res = await api.request('POST', `${base}/${rev}/submit`, { token: tokens[role] });
      return { res, stored: async (allowed) => expect((await revisionRow(rev)).state).toBe(allowed ? 'in_review' : 'draft') };
    },
  },
  {
    name: "submit someone else's draft",
    expected: statusMap(403),
    async run(role) {
      const rev = await draftBy('colleague');
      const res = await api.request('POST', `${base}/${rev}/submit`, { token: tokens[role] });
      return { res, stored: async () => expect((await revisionRow(rev)).state).toBe('draft') };
    },
  },
  {
    name: "approve someone else's revision in review",
    expected: statusMap(200, { engineer: 403 }),
    async run(role) {
      const rev = await submittedBy('colleague');
      const res = await api.request('POST', `${base}/${rev}/approve`, { token: tokens[role], body: {} });
      return { res, stored: async (allowed) => expect((await revisionRow(rev)).state).toBe(allowed ? 'approved' : 'in_review') };
    },
  },
  {
    name: "reject someone else's revision in review",
    expected: statusMap(200, { engineer: 403 }),
    async run(role) {
      const rev = await submittedBy('colleague');
      const res = await api.request('POST', `${base}/${rev}/reject`, { token: tokens[role], body: { comment: 'not yet' } });
      return { res, stored: async (allowed) => expect((await revisionRow(rev)).state).toBe(allowed ? 'rejected' : 'in_review') };
    },
  },
  {
    name: 'approve a revision they edited',
    expected: statusMap(403),
    async run(role) {
      // Someone else wrote it; this person's edit is on record among its contributors.
      const rev = await storedRevision(ids.colleague, 'in_review', [ids.colleague, ids[role]]);
      const res = await api.request('POST', `${base}/${rev}/approve`, { token: tokens[role], body: {} });
      return { res, stored: async () => expect((await revisionRow(rev)).state).toBe('in_review') };
    },
  },
  {
    name: 'request a waiver',
    expected: statusMap(201),
    async run(role) {
      const finding = await newFinding();
      const res = await api.request('POST', `/api/projects/alpha-dsp/findings/${finding}/waivers`, { token: tokens[role], body: { reason: 'codec erratum', until: inAWeek() } });
      return {
        res,
        stored: async (allowed) => {
          const rows = await api.orm.em.fork().find(Waiver, { finding }, { populate: ['requestedBy'] });
          expect(rows.map((w) => [w.requestedBy.email, w.state])).toEqual(allowed ? [[`${role}@example.test`, 'requested']] : []);
        },
      };
    },
  },
  {
    name: 'approve their own waiver',
    expected: statusMap(403),
    async run(role) {
      const id = await storedWaiver(ids[role]);
      const res = await api.request('POST', `/api/projects/alpha-dsp/waivers/${id}/approve`, { token: tokens[role], body: {} });
      return { res, stored: async () => expect(await waiverState(id)).toBe('requested') };
    },
  },
  {
    name: 'reject their own waiver',
    expected: statusMap(403),
    async run(role) {
      const id = await storedWaiver(ids[role]);
      const res = await api.request('POST', `/api/projects/alpha-dsp/waivers/${id}/reject`, { token: tokens[role], body: { comment: 'mine' } });
      return { res, stored: async () => expect(await waiverState(id)).toBe('requested') };
    },
  },
  {
    name: "approve someone else's waiver",
    expected: statusMap(200, { engineer: 403 }),
    async run(role) {
      const id = await storedWaiver(ids.colleague);
      const res = await api.request('POST', `/api/projects/alpha-dsp/waivers/${id}/approve`, { token: tokens[role], body: {} });
      return { res, stored: async (allowed) => expect(await waiverState(id)).toBe(allowed ? 'approved' : 'requested') };
    },
  },
];

describe.each(ACTIONS)('$name', (action) => {
  it.each(ROLES)(`as %s answers the expected status`, async (role) => {
    const { res, stored } = await action.run(role);
    const expected = action.expected[role];
    expect(res.status, res.text).toBe(expected);
    if (expected >= 400) expect(res.contentType).toMatch(/problem\+json/);
    await stored(expected < 300);
  });
});

// ---- the rule, step by step ---------------------------------------------------------------

describe('four eyes on masks, with no way around it', () => {
  it('the reported bug: a QA manager can neither rewrite an engineer’s draft nor submit it, so cannot approve limits they wrote', async () => {
    const rev = await draftBy('engineer', [thd, level]);
    const loosened = [{ ...thd, max: 100 }, { ...level, min: -60, max: 0 }];

    const edit = await api.request('PATCH', `${base}/${rev}`, { token: tokens.qa_manager, body: { checks: loosened } });
    expect(edit.status).toBe(403);
    expect(edit.body.detail).toBe(`Only the author of revision ${rev} (engineer@example.test) may change it; copy the revision to a draft of your own to propose other limits.`);
    const submit = await api.request('POST', `${base}/${rev}/submit`, { token: tokens.qa_manager });
    expect(submit.status).toBe(403);
    expect(submit.body.detail).toBe(`Only the author of revision ${rev} (engineer@example.test) may submit it for review; copy the revision to a draft of your own to submit your version.`);
    // Approving the draft as it stands would submit it on the author's behalf: refused too.
    const approve = await api.request('POST', `${base}/${rev}/approve`, { token: tokens.qa_manager, body: {} });
    expect(approve.status).toBe(409);
    expect(approve.body.detail).toBe(`Revision ${rev} is a draft; its author must submit it for review before it can be approved.`);

    const row = await api.orm.em.fork().findOneOrFail(MaskRevision, { testCase: testCaseId, revision: rev });
    expect(row.state).toBe('draft');
    expect(row.checks).toEqual([thd, level]);
    expect(row.contributors).toEqual([ids.engineer]);
    const trail = await api.orm.em.fork().find(AuditEvent, { subject: `mask:tone#${rev}` }, { orderBy: { createdAt: 'asc', id: 'asc' } });
    expect(trail.map((e) => [e.action, e.actor])).toEqual([['mask.draft', 'user:engineer@example.test']]);

    // The QA manager's way: a draft of their own, which someone else then reviews.
    const copy = await api.request('POST', `${base}/${rev}/copy`, { token: tokens.qa_manager, body: {} });
    expect(copy.status).toBe(201);
    expect(copy.body).toMatchObject({ author: 'qa_manager@example.test', contributors: ['qa_manager@example.test'], basedOn: rev });
  });

  it('edit-then-approve by the same person is refused, for the author and for anyone recorded as having edited', async () => {
    // The author edits their own draft, submits it, then tries to decide it.
    const own = await draftBy('qa_manager');
    expect((await api.request('PATCH', `${base}/${own}`, { token: tokens.qa_manager, body: { checks: [{ ...level, max: 0 }] } })).status).toBe(200);
    expect((await api.request('POST', `${base}/${own}/submit`, { token: tokens.qa_manager })).status).toBe(200);
    const approveOwn = await api.request('POST', `${base}/${own}/approve`, { token: tokens.qa_manager, body: {} });
    expect(approveOwn.status).toBe(403);
    expect(approveOwn.body.detail).toBe(`A mask revision must be approved by someone who neither wrote nor edited it: qa_manager@example.test wrote revision ${own}. Someone else must review it.`);

    // A contributor who is not the author (an edit recorded before the rule held).
    const edited = await storedRevision(ids.engineer, 'in_review', [ids.engineer, ids.qa_manager]);
    const approve = await api.request('POST', `${base}/${edited}/approve`, { token: tokens.qa_manager, body: {} });
    expect(approve.status).toBe(403);
    expect(approve.body.detail).toBe(`A mask revision must be approved by someone who neither wrote nor edited it: qa_manager@example.test edited revision ${edited}. Someone else must review it.`);
    const reject = await api.request('POST', `${base}/${edited}/reject`, { token: tokens.qa_manager, body: { comment: 'mine in part' } });
    expect(reject.status).toBe(403);
    expect(reject.body.detail).toMatch(/must be rejected by someone who neither wrote nor edited it: qa_manager@example\.test edited/);
    const shown = await api.request('GET', `${base}/${edited}`, { token: tokens.viewer });
    expect(shown.body.contributors).toEqual(['engineer@example.test', 'qa_manager@example.test']);

    // Someone who touched neither decides.
    const byAdmin = await api.request('POST', `${base}/${edited}/approve`, { token: tokens.admin, body: {} });
    expect(byAdmin.status, byAdmin.text).toBe(200);
    expect(byAdmin.body).toMatchObject({ state: 'approved', reviewer: 'admin@example.test' });
  });

  it('records every edit with its author and the changed fields before and after, and keeps the author as the one contributor', async () => {
    const rev = await draftBy('engineer', [level]);
    const res = await api.request('PATCH', `${base}/${rev}`, { token: tokens.engineer, body: { checks: [{ ...level, max: -12 }], note: 'quieter rig', target: 'board' } });
    expect(res.status, res.text).toBe(200);
    expect(res.body.contributors).toEqual(['engineer@example.test']);

    const history = await api.request('GET', `${base}/${rev}/history`, { token: tokens.viewer });
    const edit = history.body.items.find((e: { action: string }) => e.action === 'mask.edit');
    expect(edit.actor).toBe('user:engineer@example.test');
    expect(edit.details).toMatchObject({
      changed: ['checks', 'note', 'target'],
      before: { checks: [level], note: '', target: null },
      after: { checks: [{ ...level, max: -12 }], note: 'quieter rig', target: 'board' },
    });

    // A field sent unchanged is not reported as changed.
    await api.request('PATCH', `${base}/${rev}`, { token: tokens.engineer, body: { note: 'quieter rig', target: null } });
    const again = await api.request('GET', `${base}/${rev}/history`, { token: tokens.viewer });
    expect(again.body.items.at(-1).details).toMatchObject({ changed: ['target'], before: { target: 'board' }, after: { target: null } });
  });
});

describe('four eyes on waivers', () => {
  it('never lets the requester decide, whoever they are, and says why', async () => {
    const finding = await newFinding();
    const requested = await api.request('POST', `/api/projects/alpha-dsp/findings/${finding}/waivers`, { token: tokens.admin, body: { reason: 'rig hum', until: inAWeek() } });
    expect(requested.status).toBe(201);
    const approve = await api.request('POST', `/api/projects/alpha-dsp/waivers/${requested.body.id}/approve`, { token: tokens.admin, body: {} });
    expect(approve.status).toBe(403);
    expect(approve.body.detail).toBe('A waiver must be approved by someone who neither requested nor edited it: admin@example.test requested it. Someone else must decide it.');
    const byQa = await api.request('POST', `/api/projects/alpha-dsp/waivers/${requested.body.id}/approve`, { token: tokens.qa_manager, body: {} });
    expect(byQa.status).toBe(200);
    expect(byQa.body).toMatchObject({ state: 'approved', requestedBy: 'admin@example.test', decidedBy: 'qa_manager@example.test' });
  });
});
