import { CheckResult, Finding, MaskRevision, Notification, Target, TestCase, Verdict, Waiver, TEST_PASSWORD } from '@earmark/db';
import { StimulusSpec, type CaptureDto, type MaskCheckInput } from '@earmark/contracts';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { addDc } from '@earmark/dsp/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import type { WorkerProcess } from '../support/worker-process.js';

/**
 * Waivers in the real pipeline: a real worker process counts a failing check covered by an
 * active waiver as passed with waiver, and its sweep expires the waiver, re-opens the
 * finding and mails the person responsible.
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
  return { status: res.status, text, body: text ? (JSON.parse(text) as any) : null };
}

async function login(email: string): Promise<string> {
  const res = await call('POST', '/api/auth/login', { body: { email, password: TEST_PASSWORD }, headers: { authorization: '' } });
  return res.body.accessToken as string;
}

async function judged(sha: string, samples: Float64Array, timeoutMs = 30_000): Promise<CaptureDto> {
  const wav = encodeWav([samples], FS, { encoding: 'float', bitsPerSample: 32 });
  const up = await call('POST', `/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=tone.level&target=board`, { raw: Buffer.from(wav), headers: { 'content-type': 'audio/wav' } });
  expect(up.status, up.text).toBe(202);
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const capture = (await call('GET', `/api/v1/captures/${up.body.id}`)).body as CaptureDto;
    if (capture.verdict) return capture;
    if (Date.now() > deadline) throw new Error(`no verdict within ${timeoutMs} ms; worker said:\n${worker.output.join('').slice(-3000)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function eventually<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 15_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`${what} did not happen within ${timeoutMs} ms; worker said:\n${worker.output.join('').slice(-3000)}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

const loudnessFindings = () => stack.orm.em.fork().find(Finding, { checkId: 'loudness' }, { populate: ['capture'] });

beforeAll(async () => {
  stack = await startStack();
  const em = stack.orm.em.fork();
  const project = stack.fixture.project;
  em.create(Target, { project: project.id, key: 'board', name: 'Board', sampleRate: FS });
  const testCase = em.create(TestCase, { project: project.id, key: 'tone.level', name: 'Tone level', stimulus: toneSpec });
  em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks: mask, author: stack.fixture.users.engineer.id, reviewer: stack.fixture.users.qa_manager.id });
  await em.flush();
  worker = await stack.startWorker();
}, 120_000);
afterAll(() => stack?.close());

describe('waivers in the pipeline', () => {
  let waiverId = '';

  it('turns a failing capture into "passed with waiver" once a waiver of its failing check is approved', async () => {
    const before = await judged('1111aaa', tone);
    expect(before.verdict!.outcome).toBe('fail');
    const [finding] = await loudnessFindings();
    expect(finding!.state).toBe('open');

    const engineer = await login('engineer@example.test');
    const qa = await login('qa_manager@example.test');
    const requested = await call('POST', `/api/projects/alpha-dsp/findings/${finding!.id}/waivers`, {
      token: engineer,
      body: { reason: 'Output stage gain is trimmed on rev B boards.', until: new Date(Date.now() + 7 * 86_400_000).toISOString() },
    });
    expect(requested.status, requested.text).toBe(201);
    waiverId = requested.body.id;
    expect((await call('POST', `/api/projects/alpha-dsp/waivers/${waiverId}/approve`, { token: qa, body: {} })).status).toBe(200);

    const after = await judged('2222bbb', tone);
    expect(after.verdict!.outcome, JSON.stringify(after.verdict)).toBe('pass');
    expect(after.verdict!.reason).toBe('passed with waiver: loudness');
    const loudness = after.verdict!.checks.find((c) => c.id === 'loudness')!;
    expect(loudness.pass).toBe(false); // the measurement is not rewritten
    expect(loudness.waived).toBe(true); // and the API says why it no longer fails the capture
    const stored = await stack.orm.em.fork().findOneOrFail(CheckResult, { verdict: { capture: after.id }, checkId: 'loudness' });
    expect(stored.details.waived).toMatchObject({ waiverId, until: requested.body.until });
    expect((await call('GET', '/api/v1/projects/alpha-dsp/builds/2222bbb')).body.status).toBe('pass');

    // Still one finding for the check: the waived one, now pointing at the newest capture.
    const findings = await loudnessFindings();
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ state: 'accepted_deviation' });
    expect(findings[0]!.capture.id).toBe(after.id);
  });

  it('keeps a capture failing when a check the waiver does not cover fails too', async () => {
    const capture = await judged('3333ccc', addDc(tone, 0.01));
    expect(capture.verdict!.outcome).toBe('fail');
    const ids = capture.verdict!.checks.filter((c) => !c.pass).map((c) => c.id).sort();
    expect(ids).toEqual(['dc', 'loudness']);
    const stored = await stack.orm.em.fork().find(CheckResult, { verdict: { capture: capture.id } });
    expect(stored.find((c) => c.checkId === 'loudness')!.details.waived).toBeDefined();
    expect(stored.find((c) => c.checkId === 'dc')!.details.waived).toBeUndefined();
  });

  it('expires the waiver after its date: the finding re-opens, the requester is mailed, captures fail again', async () => {
    const em = stack.orm.em.fork();
    const waiver = await em.findOneOrFail(Waiver, { id: waiverId });
    waiver.expiresAt = new Date(Date.now() - 1000);
    await em.flush();

    await eventually('expiry', async () => (await stack.orm.em.fork().findOneOrFail(Waiver, { id: waiverId })).state === 'expired');
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
    const verdicts = await stack.orm.em.fork().count(Verdict, { outcome: 'pass' });
    expect(verdicts).toBe(1);
  });
});
