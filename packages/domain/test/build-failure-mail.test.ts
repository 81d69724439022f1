import { Build, Capture, Membership, Notification, Target, TestCase, User, Waiver, initOrm, seedRoles, type RoleFixture } from '@earmark/db';
import { createTestDatabase, type TestDatabase } from '@earmark/db/testing';
import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createLinks, errorJudgement, recordVerdict, type CheckJudgement, type Judgement } from '../src/index.js';

/**
 * The build-failure mail as the worker writes it: recordVerdict per capture, in the order the
 * captures are judged. The mail must wait for the build's final status and describe the whole
 * build, whichever capture happens to complete it.
 */
let db: TestDatabase;
let orm: MikroORM;
let fx: RoleFixture;
const links = createLinks('http://earmark.test');
const ENGINE = '9.9.9';

beforeAll(async () => {
  db = await createTestDatabase();
  orm = await initOrm({ url: db.url, poolMax: 3 });
  fx = await seedRoles(orm.em.fork());
  const em = orm.em.fork();
  // Engineer and viewer subscribed, the QA manager opted out; a disabled subscriber gets nothing.
  for (const m of await em.find(Membership, { project: fx.project.id }, { populate: ['user'] })) m.subscribed = m.role !== 'qa_manager';
  const gone = em.create(User, { email: 'gone@example.test', displayName: 'gone', passwordHash: 'x', disabled: true });
  em.create(Membership, { project: fx.project.id, user: gone, role: 'engineer', subscribed: true });
  for (const key of ['evt2-48k', 'board']) em.create(Target, { project: fx.project.id, key, name: key });
  for (const key of ['eq.music.sweep', 'noise.idle', 'tone.level']) em.create(TestCase, { project: fx.project.id, key, name: key, stimulus: { kind: 'silence' } });
  await em.flush();
});
afterAll(async () => {
  await orm?.close();
  await db?.drop();
});

const check = (c: Partial<CheckJudgement> & { id: string; pass: boolean }): CheckJudgement => ({
  kind: 'level', label: null, measured: null, limit: null, margin: null, unit: null, worstHz: null, details: {}, ...c,
});
const passing: Judgement = { outcome: 'pass', reason: null, engineVersion: ENGINE, checks: [check({ id: 'level', pass: true, measured: -13, limit: -10, margin: 3, unit: 'dBFS' })] };
const envelopeFailure: Judgement = {
  outcome: 'fail',
  reason: null,
  engineVersion: ENGINE,
  checks: [
    check({ id: 'response', kind: 'magnitude-envelope', label: 'Flat ±1 dB', pass: false, measured: 2.04, limit: 1, margin: -1.04, unit: 'dB', worstHz: 8021.7 }),
    check({ id: 'level', pass: true, measured: -13, limit: -10, margin: 3, unit: 'dBFS' }),
  ],
};
const tooShort = errorJudgement('The capture is 0.40 s long; the stimulus needs 1.80 s.', ENGINE);

async function newBuild(sha: string, cells: [testCase: string, target: string][]): Promise<Capture[]> {
  const em = orm.em.fork();
  const build = em.create(Build, { project: fx.project.id, sha, branch: 'main' });
  const captures: Capture[] = [];
  for (const [tc, t] of cells) {
    captures.push(em.create(Capture, {
      project: fx.project.id, build,
      testCase: await em.findOneOrFail(TestCase, { project: fx.project.id, key: tc }),
      target: await em.findOneOrFail(Target, { project: fx.project.id, key: t }),
      objectKey: `${sha}/${tc}/${t}`, sha256: '0'.repeat(64), sizeBytes: 1, sampleRate: 48000, channelCount: 1, frames: 1,
    }));
  }
  await em.flush();
  return captures;
}

const judge = (capture: Capture, judgement: Judgement) => recordVerdict(orm.em.fork(), capture.id, null, judgement, links);
const mailsFor = (sha: string) => orm.em.fork().find(Notification, { kind: 'build-failed', subject: { $like: `%${sha}%` } }, { orderBy: { recipient: 'asc' } });

describe('build-failure mail', () => {
  it('waits for the last capture and names every failing and erroring cell, whichever capture completes the build', async () => {
    const [sweep, idle, tone] = await newBuild('a11ce01', [['eq.music.sweep', 'evt2-48k'], ['noise.idle', 'evt2-48k'], ['tone.level', 'board']]);
    await judge(sweep!, envelopeFailure);
    await judge(idle!, tooShort);
    expect(await mailsFor('a11ce01')).toHaveLength(0); // tone.level is still queued: the status is not final

    const last = await judge(tone!, passing);
    expect(last.notificationsQueued).toBe(2);
    const mails = await mailsFor('a11ce01');
    // Subscribed, enabled members only: not the QA manager who opted out, not the disabled user.
    expect(mails.map((m) => m.recipient)).toEqual(['engineer@example.test', 'viewer@example.test']);
    const { body } = mails[0]!;
    expect(body).toContain('eq.music.sweep on evt2-48k');
    expect(body).toContain('Flat ±1 dB (response): measured 2.04 dB, limit 1.00 dB, margin −1.04 dB at 8.02 kHz');
    expect(body).toContain(links.capturePage('alpha-dsp', 'a11ce01', sweep!.id));
    expect(body).toContain('noise.idle on evt2-48k');
    expect(body).toContain('The capture is 0.40 s long; the stimulus needs 1.80 s.');
    expect(body).toContain(links.capturePage('alpha-dsp', 'a11ce01', idle!.id));
    expect(body).toContain(links.buildPage('alpha-dsp', 'a11ce01'));
    // The passing capture that completed the build is not named.
    expect(body).not.toContain('tone.level');
    expect(body).not.toContain(tone!.id);
    // The error outranks the failure (the contracts' rule).
    expect(mails[0]!.subject).toBe('[Earmark] alpha-dsp build a11ce01 has errors: 1 failing cell, 1 erroring cell');
    expect(mails[0]!.html).toContain('<a href="http://earmark.test/projects/alpha-dsp/builds/a11ce01">');
    expect(mails[0]!.payload).toMatchObject({ project: 'alpha-dsp', sha: 'a11ce01', status: 'error' });
  });

  it('names the failing cell, not the passing one judged last (the reported "noise.idle on evt2-48k: failed")', async () => {
    const [sweep, idle] = await newBuild('b0b0b02', [['eq.music.sweep', 'evt2-48k'], ['noise.idle', 'evt2-48k']]);
    await judge(sweep!, envelopeFailure);
    await judge(idle!, passing);
    const [mail] = await mailsFor('b0b0b02');
    expect(mail!.body).not.toContain('noise.idle');
    expect(mail!.body).not.toMatch(/: failed$/m);
    expect(mail!.body).toContain('eq.music.sweep on evt2-48k');
    expect(mail!.subject).toBe('[Earmark] alpha-dsp build b0b0b02 failed: 1 failing cell');
  });

  it('lists a waived check as passed with waiver until its date, never as a failure', async () => {
    const em = orm.em.fork();
    const until = new Date('2099-03-31T23:59:59.999Z');
    em.create(Waiver, {
      project: fx.project.id, testCase: await em.findOneOrFail(TestCase, { project: fx.project.id, key: 'tone.level' }), checkId: 'loudness',
      reason: 'codec erratum', expiresAt: until, state: 'approved', requestedBy: fx.users.engineer.id, approvedBy: fx.users.qa_manager.id,
    });
    await em.flush();
    const [tone, sweep] = await newBuild('c0c0c03', [['tone.level', 'board'], ['eq.music.sweep', 'board']]);
    await judge(tone!, {
      outcome: 'fail', reason: null, engineVersion: ENGINE,
      checks: [
        check({ id: 'loudness', pass: false, measured: -20.5, limit: -21, margin: -0.5, unit: 'LUFS' }),
        check({ id: 'dc', pass: false, measured: 0.012, limit: 0.01, margin: -0.002, unit: 'FS' }),
      ],
    });
    await judge(sweep!, passing);
    const [mail] = await mailsFor('c0c0c03');
    expect(mail!.body).toContain('dc: measured 0.012 FS, limit 0.01 FS, margin −0.002 FS');
    expect(mail!.body).toContain('loudness: passed with waiver, until 2099-03-31');
    expect(mail!.body).not.toMatch(/loudness: measured/);
  });

  it('is written once per build: a re-run job and a later re-judgement send nothing more', async () => {
    const [sweep, idle] = await newBuild('d0d0d04', [['eq.music.sweep', 'evt2-48k'], ['noise.idle', 'board']]);
    await judge(sweep!, envelopeFailure);
    expect((await judge(idle!, envelopeFailure)).notificationsQueued).toBe(2);
    // The same job again (same capture, revision and engine) writes nothing.
    expect(await judge(idle!, envelopeFailure)).toEqual({ written: false, notificationsQueued: 0 });
    // A newer engine judging again still leaves the build failed: no second announcement.
    expect((await recordVerdict(orm.em.fork(), idle!.id, null, { ...envelopeFailure, engineVersion: '9.9.10' }, links)).notificationsQueued).toBe(0);
    expect(await mailsFor('d0d0d04')).toHaveLength(2);
  });

  it('sends nothing for a passing build', async () => {
    const [a, b] = await newBuild('e0e0e05', [['eq.music.sweep', 'evt2-48k'], ['noise.idle', 'board']]);
    await judge(a!, passing);
    await judge(b!, passing);
    expect(await mailsFor('e0e0e05')).toHaveLength(0);
  });

  it('never replaces the verdict of a capture purged by retention while its re-evaluation ran (no "cannot be read" error, no mail)', async () => {
    const [sweep] = await newBuild('de1e7ed', [['eq.music.sweep', 'evt2-48k']]);
    expect((await judge(sweep!, passing)).written).toBe(true);
    // The retention run commits first: audio gone, row marked.
    await orm.em.fork().nativeUpdate(Capture, { id: sweep!.id }, { purgedAt: new Date() });
    const raced = await recordVerdict(orm.em.fork(), sweep!.id, null, errorJudgement('The stored capture cannot be read: no such object', '9.9.10'), links);
    expect(raced).toEqual({ written: false, notificationsQueued: 0 });
    const em = orm.em.fork();
    const capture = await em.findOneOrFail(Capture, { id: sweep!.id }, { populate: ['build'] });
    expect([capture.status, capture.build.status]).toEqual(['done', 'pass']);
    expect(await mailsFor('de1e7ed')).toHaveLength(0);
  });
});
