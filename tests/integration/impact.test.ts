import { Build, MaskRevision, Notification, TEST_PASSWORD, Target, TestCase, Verdict, testCaseSettings } from '@earmark/db';
import { StimulusSpec, type BuildMatrix, type CaptureDto, type DriftResponse, type ImpactRunDto, type MaskCheckInput } from '@earmark/contracts';
import { ENGINE_VERSION, encodeWav, generateStimulus } from '@earmark/dsp';
import { applyBiquad, peakingEqCoefficients } from '@earmark/dsp/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import type { WorkerProcess } from '../support/worker-process.js';
import { waitFor } from '../support/wait-for.js';

/**
 * Impact of draft masks on a seeded history, re-evaluation under an approved revision, and
 * drift — against a real worker process. Captures are the test case's sweep through an RBJ
 * peaking EQ at 8 kHz (Q 2), whose |H(8 kHz)| is exactly the EQ gain, so a ±E dB envelope
 * normalised at 1 kHz has a margin of about E − gain there.
 */
let stack: Stack;
let worker: WorkerProcess;
let userToken = '';
let qaToken = '';
const FS = 48000;
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 1, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.2, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const stimulus = Float64Array.from(generateStimulus(spec).channels[0]!, Math.fround);
const base = '/api/projects/alpha-dsp/test-cases/eq.sweep/masks';

const envelope = (db: number): MaskCheckInput[] => [
  { id: 'response', kind: 'magnitude-envelope', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db }, { hz: 16000, db }], lower: [{ hz: 100, db: -db }, { hz: 16000, db: -db }] },
];
/**
 * History on main: bump at 8 kHz per build; under ±1.5 dB b2 fails (margin ≈ −0.5), the others pass.
 * Under ±2.5 dB the newest (b4, margin ≈ 1.6) is 0.9 dB below the best: no drift on main.
 */
const HISTORY = [
  { sha: 'b000001', bump: 0 },
  { sha: 'b000002', bump: 2 },
  { sha: 'b000003', bump: 0 },
  { sha: 'b000004', bump: 0.9 },
];

const bumped = (gainDb: number) => (gainDb === 0 ? stimulus : applyBiquad(stimulus, peakingEqCoefficients(FS, 8000, gainDb, 2)));

async function call(method: string, path: string, opts: { token?: string; body?: unknown; raw?: BodyInit; headers?: Record<string, string> } = {}) {
  const headers: Record<string, string> = { authorization: `Bearer ${opts.token ?? stack.ciToken}`, ...opts.headers };
  if (opts.body !== undefined) headers['content-type'] = 'application/json';
  const res = await fetch(`${stack.url}${path}`, { method, headers, body: opts.raw ?? (opts.body !== undefined ? JSON.stringify(opts.body) : undefined) });
  const text = await res.text();
  return { status: res.status, text, body: text ? (JSON.parse(text) as any) : null };
}

async function submit(sha: string, branch: string, gainDb: number): Promise<CaptureDto> {
  expect((await call('POST', '/api/v1/projects/alpha-dsp/builds', { body: { sha, branch } })).status).toBeLessThan(300);
  const wav = encodeWav([bumped(gainDb)], FS, { encoding: 'float', bitsPerSample: 32 });
  const res = await call('POST', `/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=eq.sweep&target=board`, { raw: Buffer.from(wav), headers: { 'content-type': 'audio/wav' } });
  expect(res.status, res.text).toBe(202);
  return res.body as CaptureDto;
}

async function until<T>(what: string, probe: () => Promise<T | null | undefined>, timeoutMs = 60_000): Promise<T> {
  return waitFor(probe, { what, timeoutMs, intervalMs: 200, context: () => `worker said:\n${worker.output.join('').slice(-3000)}` });
}

const verdictOf = (id: string, revision?: number) =>
  until(`verdict of ${id}`, async () => {
    const c = (await call('GET', `/api/v1/captures/${id}`)).body as CaptureDto;
    return c.verdict && (revision === undefined || c.verdict.maskRevision === revision) ? c : null;
  });

async function login(email: string): Promise<string> {
  const res = await fetch(`${stack.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: TEST_PASSWORD }) });
  return ((await res.json()) as { accessToken: string }).accessToken;
}

async function runImpact(revision: number, builds: number): Promise<ImpactRunDto> {
  const started = await call('POST', `${base}/${revision}/impact`, { token: userToken, body: { builds } });
  expect(started.status, started.text).toBe(202);
  return until(`impact run of revision ${revision}`, async () => {
    const run = (await call('GET', `${base}/${revision}/impact/${started.body.id}`, { token: userToken })).body as ImpactRunDto;
    expect(run.state).not.toBe('error');
    return run.state === 'done' ? run : null;
  });
}

const captures: Record<string, string> = {};

beforeAll(async () => {
  stack = await startStack();
  const em = stack.orm.em.fork();
  const project = stack.fixture.project;
  em.create(Target, { project: project.id, key: 'board', name: 'Board', sampleRate: FS });
  const eq = em.create(TestCase, { project: project.id, key: 'eq.sweep', name: 'EQ sweep', stimulus: spec });
  const author = stack.fixture.users.engineer.id;
  const settings = testCaseSettings(eq);
  em.create(MaskRevision, { testCase: eq, revision: 1, state: 'approved', checks: envelope(1.5), settings, author, reviewer: stack.fixture.users.qa_manager.id });
  em.create(MaskRevision, { testCase: eq, revision: 2, checks: envelope(0.75), settings, author, note: 'tighter' });
  em.create(MaskRevision, { testCase: eq, revision: 3, checks: envelope(2.5), settings, author, note: 'looser' });
  await em.flush();
  worker = await stack.startWorker();
  userToken = await login('engineer@example.test');
  qaToken = await login('qa_manager@example.test');
  for (const h of HISTORY) captures[h.sha] = (await submit(h.sha, 'main', h.bump)).id;
  const outcomes = [];
  for (const h of HISTORY) outcomes.push((await verdictOf(captures[h.sha]!)).verdict!.outcome);
  expect(outcomes).toEqual(['pass', 'fail', 'pass', 'pass']);
}, 180_000);
afterAll(() => stack?.close());

const flips = (run: ImpactRunDto) => Object.fromEntries(run.result!.builds.map((b) => [b.sha, b.flip]));

describe('impact of a draft on past builds', () => {
  it('a tighter draft (±0.75 dB) fails exactly the build with the +0.9 dB bump', async () => {
    const run = await runImpact(2, 20);
    expect(run).toMatchObject({ state: 'done', progress: 4, total: 4, builds: 20 });
    expect(flips(run)).toEqual({ b000004: 'pass-to-fail', b000003: null, b000002: null, b000001: null });
    expect(run.result!.summary).toMatchObject({ builds: 4, captures: 4, passToFail: 1, failToPass: 0, capturesPassToFail: 1, capturesFailToPass: 0 });
    const b4 = run.result!.builds.find((b) => b.sha === 'b000004')!;
    expect(b4.checks).toHaveLength(1);
    const row = b4.checks[0]!;
    expect(row).toMatchObject({ checkId: 'response', unit: 'dB', flip: 'pass-to-fail', current: { pass: true }, draft: { pass: false } });
    // +0.9 dB bump: margin ≈ 1.5 − 0.9 = 0.6 dB today, ≈ 0.75 − 0.9 = −0.15 dB under the draft (cookbook |H(f0)| = gain).
    expect(row.current!.margin!).toBeCloseTo(0.6, 0);
    expect(row.draft!.margin!).toBeCloseTo(-0.15, 0);
    expect(row.current!.margin! - row.draft!.margin!).toBeCloseTo(0.75, 1);
    const worst = run.result!.summary.worst.find((w) => w.checkId === 'response')!;
    expect(worst.current! - worst.draft!).toBeCloseTo(0.75, 1); // the +2 dB build sets both
    expect(b4.captures[0]).toMatchObject({ captureId: captures.b000004, target: 'board', current: 'pass', currentRevision: 1, draft: 'fail', flip: 'pass-to-fail' });
  });

  it('a looser draft (±2.5 dB) passes exactly the build with the +2 dB bump', async () => {
    const run = await runImpact(3, 20);
    expect(flips(run)).toEqual({ b000004: null, b000003: null, b000002: 'fail-to-pass', b000001: null });
    expect(run.result!.summary).toMatchObject({ passToFail: 0, failToPass: 1 });
  });

  it('looks only at the last N builds', async () => {
    const run = await runImpact(2, 2);
    expect(run.result!.builds.map((b) => b.sha)).toEqual(['b000004', 'b000003']);
    expect(run.total).toBe(2);
  });
});

describe('re-evaluation under an approved revision', () => {
  it('gives each capture a new verdict linked to the one it replaces, and the failed build passes', async () => {
    const em = stack.orm.em.fork();
    // Approval itself belongs to the review workflow; here the revision is put in force directly.
    const [first, looser] = await Promise.all([em.findOneOrFail(MaskRevision, { revision: 1 }), em.findOneOrFail(MaskRevision, { revision: 3 })]);
    first.state = 'superseded';
    await em.flush();
    looser.state = 'approved';
    await em.flush();
    expect((await em.findOneOrFail(Build, { sha: 'b000002' })).status).toBe('fail');

    expect((await call('POST', `${base}/3/reevaluate`, { token: userToken, body: { scope: 'last-n', builds: 4 } })).status).toBe(403); // engineers cannot
    const res = await call('POST', `${base}/3/reevaluate`, { token: qaToken, body: { scope: 'last-n', builds: 4 } });
    expect(res.status, res.text).toBe(202);
    expect(res.body).toMatchObject({ revision: 3, builds: 4, queued: 4 });
    const after = [];
    const before = [];
    for (const h of HISTORY) {
      const v = (await verdictOf(captures[h.sha]!, 3)).verdict!;
      after.push(v.outcome);
      before.push(v.previousOutcome);
    }
    expect(after).toEqual(['pass', 'pass', 'pass', 'pass']);
    // The API shows what each re-evaluation changed: the outcome under the revision before.
    expect(before).toEqual(['pass', 'fail', 'pass', 'pass']);

    const fresh = em.fork();
    for (const h of HISTORY) {
      const verdicts = await fresh.find(Verdict, { capture: captures[h.sha]! }, { populate: ['maskRevision', 'previous', 'previous.maskRevision'], orderBy: { createdAt: 'asc' } });
      expect(verdicts.map((v) => v.maskRevision?.revision)).toEqual([1, 3]);
      expect(verdicts[1]!.previous?.id).toBe(verdicts[0]!.id);
      expect(verdicts[0]!.previous).toBeNull();
    }
    expect((await fresh.findOneOrFail(Build, { sha: 'b000002' })).status).toBe('pass');

    // Again: every capture already has a verdict under revision 3, so nothing is queued.
    const again = await call('POST', `${base}/3/reevaluate`, { token: qaToken, body: { scope: 'open-builds' } });
    expect(again.body).toMatchObject({ builds: 1, queued: 0 });
  });

  it('judges history again when the engine is newer, and the capture says which checks changed and why', async () => {
    // History judged by an older engine: mark revision 3's verdicts as engine 0.4.0, and give
    // b000001's check the wrong number an older engine could have produced.
    const conn = stack.orm.em.fork().getConnection();
    await conn.execute(`update verdict set engine_version = '0.4.0' where mask_revision_id = (select id from mask_revision where revision = 3 and test_case_id = (select id from test_case where key = 'eq.sweep'))`);
    await conn.execute(`update check_result set pass = false, measured = 9.5, margin = -7 where check_id = 'response' and verdict_id = (select id from verdict where capture_id = ? and engine_version = '0.4.0')`, [captures['b000001']!]);
    const res = await call('POST', `${base}/3/reevaluate`, { token: qaToken, body: { scope: 'last-n', builds: 4 } });
    expect(res.status, res.text).toBe(202);
    expect(res.body).toMatchObject({ revision: 3, builds: 4, queued: 4 });
    const first = await until('re-evaluation by the new engine', async () => {
      const c = (await call('GET', `/api/v1/captures/${captures['b000001']!}`)).body as CaptureDto;
      return c.verdict && c.verdict.engineVersion === ENGINE_VERSION ? c : null;
    });
    const v = first.verdict!;
    expect(v).toMatchObject({ outcome: 'pass', previousOutcome: 'pass', previousEngineVersion: '0.4.0', previousMaskRevision: 3, maskRevision: 3 });
    // Exactly the check whose number moved is listed, with both numbers (the new one ≈ the 8 kHz-free response).
    expect(v.changes?.map((c) => c.checkId)).toEqual(['response']);
    expect(v.changes?.[0]).toMatchObject({ unit: 'dB', before: { pass: false, measured: 9.5 }, after: { pass: true } });
    expect(Math.abs(v.changes![0]!.after!.measured!)).toBeLessThan(1);
    // An untouched capture: judged again, nothing changed.
    const other = await until('re-evaluation of b000003', async () => {
      const c = (await call('GET', `/api/v1/captures/${captures['b000003']!}`)).body as CaptureDto;
      return c.verdict && c.verdict.engineVersion === ENGINE_VERSION ? c : null;
    });
    expect(other.verdict).toMatchObject({ previousEngineVersion: '0.4.0', changes: [] });
    for (const h of HISTORY) {
      await until(`re-evaluation of ${h.sha}`, async () => {
        const c = (await call('GET', `/api/v1/captures/${captures[h.sha]!}`)).body as CaptureDto;
        return c.verdict && c.verdict.engineVersion === ENGINE_VERSION ? c : null;
      });
    }
    // Judged by this engine now: nothing more to queue.
    expect((await call('POST', `${base}/3/reevaluate`, { token: qaToken, body: { scope: 'last-n', builds: 4 } })).body).toMatchObject({ queued: 0 });
  });
});

describe('drift', () => {
  it('flags a passing margin that shrank by more than the threshold, on the build page and once by mail', async () => {
    // Under ±2.5 dB the margins are ≈ 2.5, 2.2, 1.9, 0.9 dB: the last is 1.6 dB below the best (> 1 dB).
    const series = [
      { sha: 'd000001', bump: 0 },
      { sha: 'd000002', bump: 0.3 },
      { sha: 'd000003', bump: 0.6 },
      { sha: 'd000004', bump: 1.6 },
    ];
    for (const s of series) {
      const c = await submit(s.sha, 'drift', s.bump);
      expect((await verdictOf(c.id)).verdict!.outcome).toBe('pass');
    }
    const drift = (await call('GET', '/api/projects/alpha-dsp/drift?branch=drift', { token: userToken })).body as DriftResponse;
    expect(drift).toMatchObject({ branch: 'drift', window: 10, thresholdDb: 1 });
    expect(drift.series).toHaveLength(1);
    const s = drift.series[0]!;
    expect(s.points.map((p) => p.sha)).toEqual(series.map((x) => x.sha));
    expect(s.points[0]!.margin!).toBeCloseTo(2.5, 0);
    expect(s.flag).toMatchObject({ testCase: 'eq.sweep', target: 'board', checkId: 'response', bestSha: 'd000001', latestSha: 'd000004', thresholdDb: 1, builds: 4 });
    expect(s.flag!.shrinkDb).toBeCloseTo(1.6, 0);

    const matrix = (sha: string) => call('GET', `/api/projects/alpha-dsp/builds/${sha}/matrix`, { token: userToken }).then((r) => r.body as BuildMatrix);
    expect((await matrix('d000004')).drift!.map((f) => f.checkId)).toEqual(['response']);
    expect((await matrix('d000003')).drift).toEqual([]);

    // One mail per subscribed member (engineer and QA manager by default; not the viewer), for d000004 only.
    const mails = await until('drift mail', async () => {
      const rows = await stack.orm.em.fork().find(Notification, { kind: 'drift' }, { orderBy: { recipient: 'asc' } });
      return rows.length ? rows : null;
    });
    expect(mails.map((m) => [m.recipient, m.payload.sha, m.payload.checkId])).toEqual([
      ['engineer@example.test', 'd000004', 'response'],
      ['qa_manager@example.test', 'd000004', 'response'],
    ]);
    expect(mails[0]!.body).toContain('shrank by');
  });
});
