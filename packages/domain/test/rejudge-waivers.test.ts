import { Build, Capture, CheckResult, Finding, MaskRevision, Project, Target, TestCase, Verdict, Waiver, initOrm, seedRoles, testCaseSettings, type RoleFixture } from '@earmark/db';
import { createTestDatabase, type TestDatabase } from '@earmark/db/testing';
import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expireWaivers } from '../src/judging/waivers.js';
import { recordVerdict, type RecordDeps } from '../src/judging/record-verdict.js';
import { rejudgeWaiverScope } from '../src/judging/rejudge-waivers.js';
import type { Judgement } from '../src/judging/judgement.js';

/**
 * Re-judging on a waiver change against a real database, without the DSP: verdicts are
 * recorded from made-up judgements, then a waiver is approved, scoped, revoked or expired.
 */
let db: TestDatabase;
let orm: MikroORM;
let fixture: RoleFixture;
const links: RecordDeps = { capturePage: () => 'http://x/c', buildPage: () => 'http://x/b', settingsPage: () => 'http://x/s' };
const inDays = (d: number) => new Date(Date.now() + d * 86_400_000);

function judgement(failing: string[], outcome: Judgement['outcome'] = failing.length ? 'fail' : 'pass'): Judgement {
  const check = (id: string) => ({ id, kind: 'level', label: null, pass: !failing.includes(id), measured: -20, limit: -12, margin: failing.includes(id) ? -8 : 3, unit: 'dBFS', worstHz: null, details: {} });
  return { outcome, reason: failing.length ? `${failing.length} of 2 checks failed: ${failing.join(', ')}` : null, engineVersion: '9.9.9', checks: [check('loudness'), check('dc')] };
}

let seq = 0;
async function scene() {
  const em = orm.em.fork();
  const project = await em.findOneOrFail(Project, { key: fixture.project.key });
  seq += 1;
  const testCase = em.create(TestCase, { project, key: `tone.${seq}`, name: 'tone', stimulus: { kind: 'silence' } });
  const boardA = em.create(Target, { project, key: `a-${seq}`, name: 'A' });
  const boardB = em.create(Target, { project, key: `b-${seq}`, name: 'B' });
  const mask = em.create(MaskRevision, { testCase, revision: 1, state: 'approved', settings: testCaseSettings(testCase), author: fixture.users.engineer.id });
  await em.flush();
  /** A capture of a new build on `target`, judged with `j`. */
  const judged = async (target: Target, j: Judgement) => {
    const build = em.create(Build, { project, sha: `${seq}${Math.random().toString(16).slice(2, 10)}` });
    const capture = em.create(Capture, { project, build, testCase, target, objectKey: 'k', sha256: '0'.repeat(64), sizeBytes: 1, sampleRate: 48000, channelCount: 1, frames: 1 });
    await em.flush();
    await recordVerdict(orm.em.fork(), capture.id, mask, j, links);
    return { capture, build };
  };
  const approve = async (target: Target | null, until = inDays(30), checkId = 'loudness') => {
    const tx = orm.em.fork();
    const waiver = tx.create(Waiver, { project, testCase, target, checkId, reason: 'known', expiresAt: until, state: 'approved', requestedBy: fixture.users.engineer.id, approvedBy: fixture.users.qa_manager.id });
    await tx.flush();
    await tx.populate(waiver, ['project', 'testCase', 'target']);
    const result = await tx.transactional((inner) => rejudgeWaiverScope(inner, waiver, { kind: 'approved', waiverId: waiver.id }, 'user:qa_manager@example.test'));
    return { waiver, result };
  };
  return { em, project, testCase, boardA, boardB, mask, judged, approve };
}

const verdicts = (captureId: string) => orm.em.fork().find(Verdict, { capture: captureId }, { orderBy: { createdAt: 'asc', id: 'asc' }, populate: ['previous'] });
const buildStatus = async (id: string) => (await orm.em.fork().findOneOrFail(Build, { id })).status;

beforeAll(async () => {
  db = await createTestDatabase();
  orm = await initOrm({ url: db.url, poolMax: 4 });
  fixture = await seedRoles(orm.em.fork());
});
afterAll(async () => {
  await orm.close();
  await db.drop();
});

describe('rejudgeWaiverScope', () => {
  it('writes a new verdict linked to the replaced one, copies the measurements, and sets the build status', async () => {
    const s = await scene();
    const { capture, build } = await s.judged(s.boardA, judgement(['loudness']));
    expect(await buildStatus(build.id)).toBe('fail');
    const { waiver, result } = await s.approve(null);
    expect(result.captures).toEqual([capture.id]);
    expect(result.builds).toEqual([{ sha: build.sha, status: 'pass' }]);

    const [first, second] = await verdicts(capture.id);
    expect(second).toMatchObject({ outcome: 'pass', reason: 'passed with waiver: loudness', engineVersion: '9.9.9', waiverBasis: `${waiver.id};approved=${waiver.id}` });
    expect(second!.previous!.id).toBe(first!.id);
    expect(second!.maskRevision!.id).toBe(s.mask.id);
    const results = await orm.em.fork().find(CheckResult, { verdict: second!.id }, { orderBy: { checkId: 'asc' } });
    expect(results.map((r) => [r.checkId, r.pass, r.measured, r.margin, r.details.waived ?? null])).toEqual([
      ['dc', true, -20, 3, null],
      ['loudness', false, -20, -8, { waiverId: waiver.id, until: waiver.expiresAt.toISOString() }],
    ]);
    expect(await buildStatus(build.id)).toBe('pass');
    // The finding follows its check's newest result and becomes an accepted deviation.
    const finding = await orm.em.fork().findOneOrFail(Finding, { capture: capture.id, checkId: 'loudness' }, { populate: ['checkResult'] });
    expect(finding.state).toBe('accepted_deviation');
    expect(finding.checkResult!.id).toBe(results[1]!.id);
  });

  it('leaves a re-run of the analysis job idempotent after re-judging', async () => {
    const s = await scene();
    const { capture } = await s.judged(s.boardA, judgement(['loudness']));
    await s.approve(null);
    const again = await recordVerdict(orm.em.fork(), capture.id, s.mask, judgement(['loudness']), links);
    expect(again.written).toBe(false);
    expect((await verdicts(capture.id)).map((v) => v.outcome)).toEqual(['fail', 'pass']);
  });

  it('touches only its target when scoped, only captures failing its check, and never an error', async () => {
    const s = await scene();
    const onA = await s.judged(s.boardA, judgement(['loudness']));
    const onB = await s.judged(s.boardB, judgement(['loudness']));
    const dcOnly = await s.judged(s.boardA, judgement(['dc']));
    const broken = await s.judged(s.boardA, { ...judgement(['loudness']), outcome: 'error', reason: 'check "loudness" could not be evaluated' });
    const { result } = await s.approve(s.boardA);
    expect(result.captures).toEqual([onA.capture.id]);
    expect((await verdicts(onB.capture.id)).map((v) => v.outcome)).toEqual(['fail']);
    expect((await verdicts(dcOnly.capture.id)).map((v) => v.outcome)).toEqual(['fail']);
    expect((await verdicts(broken.capture.id)).map((v) => v.outcome)).toEqual(['error']);
  });

  it('marks the waived check but keeps failing when another check fails too', async () => {
    const s = await scene();
    const { capture, build } = await s.judged(s.boardA, judgement(['loudness', 'dc']));
    const { waiver } = await s.approve(null);
    const [, second] = await verdicts(capture.id);
    expect(second).toMatchObject({ outcome: 'fail', reason: '2 of 2 checks failed: loudness, dc' });
    const loudness = await orm.em.fork().findOneOrFail(CheckResult, { verdict: second!.id, checkId: 'loudness' });
    expect(loudness.details.waived).toMatchObject({ waiverId: waiver.id });
    expect(await buildStatus(build.id)).toBe('fail');
  });

  it('writes nothing when the newly approved waiver ends before the one already applied', async () => {
    const s = await scene();
    const { capture } = await s.judged(s.boardA, judgement(['loudness']));
    const { waiver: long } = await s.approve(null, inDays(60));
    const { result } = await s.approve(null, inDays(10));
    expect(result.captures).toEqual([]);
    const newest = (await verdicts(capture.id)).at(-1)!;
    expect(newest.waiverBasis).toBe(`${long.id};approved=${long.id}`);
  });

  it('on expiry: fails again with the analysis reason, or moves to another waiver still running', async () => {
    const s = await scene();
    const { capture, build } = await s.judged(s.boardA, judgement(['loudness']));
    const { waiver: first } = await s.approve(null, inDays(20));
    const { waiver: second } = await s.approve(null, inDays(40));
    expect((await verdicts(capture.id)).at(-1)!.waiverBasis).toBe(`${second.id};approved=${second.id}`);

    // The longer one ends first (its date moved into the past): the shorter one covers the check now.
    const em = orm.em.fork();
    await em.nativeUpdate(Waiver, { id: second.id }, { expiresAt: new Date(Date.now() - 1000) });
    expect(await expireWaivers(orm.em.fork())).toBe(1);
    let newest = (await verdicts(capture.id)).at(-1)!;
    expect(newest).toMatchObject({ outcome: 'pass', waiverBasis: `${first.id};expired=${second.id}` });

    await em.nativeUpdate(Waiver, { id: first.id }, { expiresAt: new Date(Date.now() - 1000) });
    expect(await expireWaivers(orm.em.fork())).toBe(1);
    const all = await verdicts(capture.id);
    newest = all.at(-1)!;
    expect(all.map((v) => v.outcome)).toEqual(['fail', 'pass', 'pass', 'pass', 'fail']);
    expect(newest).toMatchObject({ outcome: 'fail', reason: '1 of 2 checks failed: loudness', waiverBasis: `;expired=${first.id}` });
    expect(newest.previous!.id).toBe(all.at(-2)!.id);
    expect(await buildStatus(build.id)).toBe('fail');
    const finding = await orm.em.fork().findOneOrFail(Finding, { capture: capture.id, checkId: 'loudness' });
    expect(finding.state).toBe('open');
  });
});
