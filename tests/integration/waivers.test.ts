import { CheckResult, Finding, MaskRevision, Notification, Target, TestCase, Verdict, Waiver, TEST_PASSWORD, testCaseSettings } from '@earmark/db';
import { StimulusSpec, type CaptureDto, type MaskCheckInput } from '@earmark/contracts';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { addDc } from '@earmark/dsp/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import type { WorkerProcess } from '../support/worker-process.js';
import { waitFor } from '../support/wait-for.js';

/**
 * Waivers in the real pipeline: approving a waiver re-judges the captures it governs at once
 * (without analysing them again) and a real worker process counts new captures of the waived
 * check as passed with waiver; revocation and the worker's expiry sweep turn them back to
 * failing, re-open the finding and (on expiry) mail the person responsible.
 */
let stack: Stack;
let worker: WorkerProcess;
const FS = 48000;
// A −20 dBFS sine reads −20 dBFS RMS (AES17), so the `loudness` check below fails by 8 dB.
const toneSpec = StimulusSpec.parse({ kind: 'sine', sampleRate: FS, seconds: 0.5, frequency: 997 });
const tone = Float64Array.from(generateStimulus(toneSpec).channels[0]!, Math.fround);
const mask: MaskCheckInput[] = [
  { id: 'loudness', kind: 'level', metric: 'rms-dbfs', min: -12, max: 0 },
  { id: 'dc', kind: 'integrity', metric: 'dc-offset', max: 0.001 },
];

async function call(method: string, path: string, opts: { token?: string; body?: unknown; raw?: BodyInit; headers?: Record<string, string> } = {}) {
  const headers: Record<string, string> = { authorization: `Bearer ${opts.token ?? stack.ciToken}`, ...opts.headers };
  if (opts.body !== undefined) headers['content-type'] = 'application/json';
  const res = await fetch(`${stack.url}${path}`, { method, headers, body: opts.raw ?? (opts.body === undefined ? undefined : JSON.stringify(opts.body)) });
  const text = await res.text();
  return { status: res.status, text, body: text && res.headers.get('content-type')?.includes('json') ? (JSON.parse(text) as any) : null };
}

async function login(email: string): Promise<string> {
  const res = await call('POST', '/api/auth/login', { body: { email, password: TEST_PASSWORD }, headers: { authorization: '' } });
  return res.body.accessToken as string;
}

async function judged(sha: string, samples: Float64Array, timeoutMs = 30_000): Promise<CaptureDto> {
  const wav = encodeWav([samples], FS, { encoding: 'float', bitsPerSample: 32 });
  const up = await call('POST', `/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=tone.level&target=board`, { raw: Buffer.from(wav), headers: { 'content-type': 'audio/wav' } });
  expect(up.status, up.text).toBe(202);
  return waitFor(
    async () => {
      const capture = (await call('GET', `/api/v1/captures/${up.body.id}`)).body as CaptureDto;
      return capture.verdict ? capture : null;
    },
    { what: `a verdict for capture ${up.body.id}`, timeoutMs, context: workerSaid },
  );
}

async function eventually<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 15_000): Promise<T> {
  return (await waitFor(probe, { what, timeoutMs, intervalMs: 150, context: workerSaid })) as T;
}

function workerSaid(): string {
  return `worker said:\n${worker.output.join('').slice(-3000)}`;
}

const loudnessFindings = () => stack.orm.em.fork().find(Finding, { checkId: 'loudness' }, { populate: ['capture'] });
const capture = async (id: string) => (await call('GET', `/api/v1/captures/${id}`)).body as CaptureDto;
const buildStatus = async (sha: string) => (await call('GET', `/api/v1/projects/alpha-dsp/builds/${sha}`)).body.status as string;
const junitXml = async (sha: string) => (await call('GET', `/api/v1/projects/alpha-dsp/builds/${sha}/junit.xml`)).text;
const failures = (xml: string) => (xml.match(/<failure\b/g) ?? []).length;
const verdictsOf = (captureId: string) => stack.orm.em.fork().find(Verdict, { capture: captureId }, { orderBy: { createdAt: 'asc', id: 'asc' }, populate: ['previous'] });

beforeAll(async () => {
  stack = await startStack();
  const em = stack.orm.em.fork();
  const project = stack.fixture.project;
  em.create(Target, { project: project.id, key: 'board', name: 'Board', sampleRate: FS });
  const testCase = em.create(TestCase, { project: project.id, key: 'tone.level', name: 'Tone level', stimulus: toneSpec });
  em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks: mask, settings: testCaseSettings(testCase), author: stack.fixture.users.engineer.id, reviewer: stack.fixture.users.qa_manager.id });
  await em.flush();
  worker = await stack.startWorker();
}, 120_000);
afterAll(() => stack?.close());

describe('waivers in the pipeline', () => {
  let engineer = '';
  let qa = '';
  let failing: CaptureDto;
  let waiverId = '';
  let until = '';

  it('judges a build that fails only on the loudness check', async () => {
    [engineer, qa] = [await login('engineer@example.test'), await login('qa_manager@example.test')];
    failing = await judged('1111aaa', tone);
    expect(failing.verdict!.outcome).toBe('fail');
    expect(failing.verdict!.checks.filter((c) => !c.pass).map((c) => c.id)).toEqual(['loudness']);
    expect(await buildStatus('1111aaa')).toBe('fail');
    expect(failures(await junitXml('1111aaa'))).toBe(1);
    const [finding] = await loudnessFindings();
    expect(finding!.state).toBe('open');
  });

  it('passes the already-judged capture with waiver as soon as the waiver is approved, without uploading anything', async () => {
    const [finding] = await loudnessFindings();
    const requested = await call('POST', `/api/projects/alpha-dsp/findings/${finding!.id}/waivers`, {
      token: engineer,
      body: { reason: 'Output stage gain is trimmed on rev B boards.', until: new Date(Date.now() + 7 * 86_400_000).toISOString() },
    });
    expect(requested.status, requested.text).toBe(201);
    waiverId = requested.body.id;
    until = requested.body.until;
    // Still failing while the waiver waits for a decision.
    expect((await capture(failing.id)).verdict!.outcome).toBe('fail');
    const approved = await call('POST', `/api/projects/alpha-dsp/waivers/${waiverId}/approve`, { token: qa, body: {} });
    expect(approved.status, approved.text).toBe(200);

    // No polling: the approval answers once the capture has been judged again.
    const now = (await capture(failing.id)).verdict!;
    expect(now.outcome, JSON.stringify(now)).toBe('pass');
    expect(now.reason).toBe('passed with waiver: loudness');
    expect(now.waiver).toEqual({ id: waiverId, until });
    expect(now.previousOutcome).toBe('fail');
    const loudness = now.checks.find((c) => c.id === 'loudness')!;
    expect(loudness).toMatchObject({ pass: false, waived: true, waiver: { id: waiverId, until } });
    expect(loudness.measured).toBe(failing.verdict!.checks.find((c) => c.id === 'loudness')!.measured); // not measured again
    expect(now.checks.find((c) => c.id === 'dc')!.waiver).toBeNull();

    const verdicts = await verdictsOf(failing.id);
    expect(verdicts.map((v) => v.outcome)).toEqual(['fail', 'pass']);
    expect(verdicts[1]!.previous!.id).toBe(verdicts[0]!.id);
    expect([verdicts[1]!.engineVersion, verdicts[1]!.maskRevision?.id]).toEqual([verdicts[0]!.engineVersion, verdicts[0]!.maskRevision?.id]);
    const stored = await stack.orm.em.fork().findOneOrFail(CheckResult, { verdict: verdicts[1]!.id, checkId: 'loudness' });
    expect(stored.details.waived).toEqual({ waiverId, until });

    expect(await buildStatus('1111aaa')).toBe('pass');
    const junit = await junitXml('1111aaa');
    expect(failures(junit)).toBe(0);
    expect(junit).toContain('name="loudness"');

    const builds = await call('GET', '/api/projects/alpha-dsp/builds', { token: engineer });
    expect(builds.body.items.find((b: { sha: string }) => b.sha === '1111aaa')).toMatchObject({ status: 'pass', counts: { pass: 1, fail: 0, waived: 1 } });
    const matrix = await call('GET', '/api/projects/alpha-dsp/builds/1111aaa/matrix', { token: engineer });
    expect(matrix.body.cells).toEqual([expect.objectContaining({ testCase: 'tone.level', target: 'board', outcome: 'pass', waiver: { id: waiverId, until } })]);
    expect((await loudnessFindings()).map((f) => f.state)).toEqual(['accepted_deviation']);
  });

  it('judges a new capture of the waived check as passed with waiver too', async () => {
    const after = await judged('2222bbb', tone);
    expect(after.verdict!.outcome, JSON.stringify(after.verdict)).toBe('pass');
    expect(after.verdict!.reason).toBe('passed with waiver: loudness');
    expect(after.verdict!.waiver).toEqual({ id: waiverId, until });
    expect(await buildStatus('2222bbb')).toBe('pass');
    // Still one finding for the check: the waived one, now pointing at the newest capture.
    const findings = await loudnessFindings();
    expect(findings.map((f) => [f.state, f.capture.id])).toEqual([['accepted_deviation', after.id]]);
  });

  it('keeps a capture failing when a check the waiver does not cover fails too', async () => {
    const both = await judged('3333ccc', addDc(tone, 0.01));
    expect(both.verdict!.outcome).toBe('fail');
    expect(both.verdict!.waiver).toBeNull();
    const checks = both.verdict!.checks.filter((c) => !c.pass);
    expect(checks.map((c) => [c.id, c.waiver?.id ?? null])).toEqual([['dc', null], ['loudness', waiverId]]);
    expect(failures(await junitXml('3333ccc'))).toBe(1); // dc only
  });

  it('fails the captures again at once when a QA manager revokes the waiver, and re-opens the finding', async () => {
    const url = `/api/projects/alpha-dsp/waivers/${waiverId}/revoke`;
    expect((await call('POST', url, { token: engineer, body: { reason: 'no' } })).status).toBe(403);
    const bare = await call('POST', url, { token: qa, body: {} });
    expect(bare.status).toBe(422);
    expect(bare.body.errors[0].path).toBe('body.reason');
    const revoked = await call('POST', url, { token: qa, body: { reason: 'Rev B boards are retired; the trim is no excuse any more.' } });
    expect(revoked.status, revoked.text).toBe(200);
    expect(revoked.body).toMatchObject({ id: waiverId, state: 'revoked', active: false });
    expect((await call('POST', url, { token: qa, body: { reason: 'again' } })).status).toBe(409);

    for (const [sha, id] of [['1111aaa', failing.id]] as const) {
      const v = (await capture(id)).verdict!;
      expect(v.outcome, sha).toBe('fail');
      expect(v.previousOutcome).toBe('pass');
      expect(v.reason).not.toMatch(/waiver/);
      expect(v.waiver).toBeNull();
      expect(v.checks.find((c) => c.id === 'loudness')).toMatchObject({ pass: false, waiver: null });
      expect(await buildStatus(sha)).toBe('fail');
    }
    expect(await buildStatus('2222bbb')).toBe('fail');
    expect(failures(await junitXml('1111aaa'))).toBe(1);
    expect((await verdictsOf(failing.id)).map((v) => v.outcome)).toEqual(['fail', 'pass', 'fail']);
    expect((await loudnessFindings()).map((f) => f.state)).toEqual(['open']);
    const trail = await call('GET', `/api/projects/alpha-dsp/audit?entity=waiver:${waiverId}`, { token: qa });
    expect(trail.body.items[0]).toMatchObject({ action: 'waiver.revoke', actor: 'user:qa_manager@example.test', fromState: 'approved', toState: 'revoked', comment: 'Rev B boards are retired; the trim is no excuse any more.' });
  });

  it('fails the captures again when a waiver expires: the sweep re-judges, re-opens the finding and mails the requester', async () => {
    const [finding] = await loudnessFindings();
    const requested = await call('POST', `/api/projects/alpha-dsp/findings/${finding!.id}/waivers`, { token: engineer, body: { reason: 'Until the rev C trim lands.', until: new Date(Date.now() + 86_400_000).toISOString() } });
    expect(requested.status, requested.text).toBe(201);
    expect((await call('POST', `/api/projects/alpha-dsp/waivers/${requested.body.id}/approve`, { token: qa, body: {} })).status).toBe(200);
    expect((await capture(failing.id)).verdict!.waiver).toEqual({ id: requested.body.id, until: requested.body.until });
    expect(await buildStatus('1111aaa')).toBe('pass');

    const em = stack.orm.em.fork();
    const waiver = await em.findOneOrFail(Waiver, { id: requested.body.id });
    waiver.expiresAt = new Date(Date.now() - 1000);
    await em.flush();

    await eventually('expiry', async () => (await stack.orm.em.fork().findOneOrFail(Waiver, { id: waiver.id })).state === 'expired');
    const v = (await capture(failing.id)).verdict!;
    expect(v.outcome).toBe('fail');
    expect(v.waiver).toBeNull();
    expect(await buildStatus('1111aaa')).toBe('fail');
    expect(await buildStatus('2222bbb')).toBe('fail');
    expect(failures(await junitXml('1111aaa'))).toBe(1);
    expect((await verdictsOf(failing.id)).map((x) => x.outcome)).toEqual(['fail', 'pass', 'fail', 'pass', 'fail']);
    expect((await loudnessFindings()).map((f) => f.state)).toEqual(['open']);
    const mail = await stack.orm.em.fork().find(Notification, { kind: 'waiver-expired' });
    expect(mail.map((n) => n.recipient)).toEqual(['engineer@example.test']);
    expect(mail[0]!.subject).toContain('waiver for tone.level / loudness expired');
    // The outbox row really goes out through SMTP.
    await eventually('the expiry mail in the inbox', async () => {
      const inbox = (await (await fetch(`${stack.smtp.inboxUrl}api/email`)).json()) as { subject: string }[];
      return inbox.some((m) => m.subject.includes('expired'));
    });

    const again = await judged('4444ddd', tone);
    expect(again.verdict!.outcome).toBe('fail');
    expect(again.verdict!.reason).not.toMatch(/waiver/);
  });
});
