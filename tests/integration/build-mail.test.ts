import { MaskRevision, Notification, TEST_PASSWORD, Target, TestCase, Verdict, testCaseSettings } from '@earmark/db';
import { QUEUES, StimulusSpec, type CaptureDto, type MaskCheckInput } from '@earmark/contracts';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { applyBiquad, peakingEqCoefficients } from '@earmark/dsp/testing';
import { startBoss } from '@earmark/platform';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import type { WorkerProcess } from '../support/worker-process.js';

/**
 * The build-failure mail end to end: three captures of one build — one failing, one that cannot
 * be judged (too short for its stimulus) and one passing that the worker judges last. One mail per
 * subscriber goes out through SMTP once the build's status is final, naming the failing and the
 * erroring cell; a member who switched the mail off gets none; re-running a job sends nothing.
 */
let stack: Stack;
let worker: WorkerProcess;
const SHA = 'feed0b1d';
const FROM = 'Earmark gate <gate@earmark.example>';
const FS = 48000;
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 1, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.2, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const stimulus = Float64Array.from(generateStimulus(spec).channels[0]!, Math.fround);
// A label with markup in it: the HTML part must show it as text.
const mask: MaskCheckInput[] = [
  { id: 'response', kind: 'magnitude-envelope', label: 'Flat <±1 dB> & tight', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 100, db: -1 }, { hz: 16000, db: -1 }] },
];

type InboxMail = { to: { address: string }[]; from: { address: string; name: string }[]; subject: string; text: string; html: string };

async function call(method: string, path: string, opts: { token?: string; body?: unknown; raw?: BodyInit; headers?: Record<string, string> } = {}) {
  const headers: Record<string, string> = { authorization: `Bearer ${opts.token ?? stack.ciToken}`, ...opts.headers };
  if (opts.body !== undefined) headers['content-type'] = 'application/json';
  const res = await fetch(`${stack.url}${path}`, { method, headers, body: opts.raw ?? (opts.body !== undefined ? JSON.stringify(opts.body) : undefined) });
  const text = await res.text();
  return { status: res.status, text, body: text ? (JSON.parse(text) as any) : null };
}

async function login(email: string): Promise<string> {
  const res = await call('POST', '/api/auth/login', { token: '', body: { email, password: TEST_PASSWORD } });
  expect(res.status, res.text).toBe(200);
  return res.body.accessToken as string;
}

async function submit(testCase: string, samples: Float64Array): Promise<CaptureDto> {
  const wav = encodeWav([samples], FS, { encoding: 'float', bitsPerSample: 32 });
  const res = await call('POST', `/api/v1/projects/alpha-dsp/builds/${SHA}/captures?testCase=${testCase}&target=board`, { raw: Buffer.from(wav), headers: { 'content-type': 'audio/wav' } });
  expect(res.status, res.text).toBe(202);
  return res.body as CaptureDto;
}

async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 60_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`${what} did not happen within ${timeoutMs} ms; worker said:\n${worker.output.join('').slice(-3000)}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

const inbox = async (): Promise<InboxMail[]> => (await (await fetch(`${stack.smtp.inboxUrl}api/email`)).json()) as InboxMail[];
const buildMails = async () => (await inbox()).filter((m) => m.subject.includes(SHA));
const outboxRows = () => stack.orm.em.fork().find(Notification, { kind: 'build-failed', payload: { sha: SHA } });

let failing: CaptureDto;
let erroring: CaptureDto;
let passing: CaptureDto;

beforeAll(async () => {
  stack = await startStack();
  const em = stack.orm.em.fork();
  const project = stack.fixture.project;
  em.create(Target, { project: project.id, key: 'board', name: 'Board', sampleRate: FS });
  for (const key of ['eq.bumped', 'eq.short', 'eq.clean']) {
    const testCase = em.create(TestCase, { project: project.id, key, name: key, stimulus: spec });
    em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks: mask, settings: testCaseSettings(testCase), author: stack.fixture.users.engineer.id, reviewer: stack.fixture.users.qa_manager.id });
  }
  await em.flush();

  // A second engineer, added the way an admin does it (subscribed by default), who switches the mail off.
  const admin = await login('admin@example.test');
  expect((await call('POST', '/api/admin/users', { token: admin, body: { email: 'engineer2@example.test', displayName: 'Second Engineer', password: TEST_PASSWORD } })).status).toBe(201);
  expect((await call('PUT', '/api/projects/alpha-dsp/members', { token: admin, body: { email: 'engineer2@example.test', role: 'engineer' } })).status).toBe(200);
  const engineer2 = await login('engineer2@example.test');
  expect((await call('GET', '/api/projects/alpha-dsp/subscription', { token: engineer2 })).body).toEqual({ buildFailures: true });
  const off = await call('PUT', '/api/projects/alpha-dsp/subscription', { token: engineer2, body: { buildFailures: false } });
  expect(off.status, off.text).toBe(200);
  expect(off.body).toEqual({ buildFailures: false });

  // All three are uploaded before a worker runs, so the passing capture (queued last) is judged last.
  failing = await submit('eq.bumped', applyBiquad(stimulus, peakingEqCoefficients(FS, 8000, 2, 2)));
  erroring = await submit('eq.short', stimulus.slice(0, FS / 10));
  passing = await submit('eq.clean', stimulus);
  worker = await stack.startWorker({ EARMARK_MAIL_FROM: FROM });
}, 120_000);
afterAll(() => stack?.close());

describe('build-failure mail', () => {
  it('goes out once per subscriber after all three captures are judged, naming the failing and the erroring cell only', async () => {
    const mails = await until('build mail in the inbox', async () => {
      const found = await buildMails();
      return found.length >= 2 && found;
    });
    // Every capture has its verdict, and the passing one was judged last.
    const verdicts = await stack.orm.em.fork().find(Verdict, { capture: { $in: [failing.id, erroring.id, passing.id] } }, { orderBy: { createdAt: 'asc' } });
    expect(verdicts.map((v) => [v.capture.id, v.outcome])).toEqual([[failing.id, 'fail'], [erroring.id, 'error'], [passing.id, 'pass']]);
    // Written in the transaction of the last verdict, not before.
    const rows = await outboxRows();
    expect(rows.every((n) => n.createdAt >= verdicts[2]!.createdAt)).toBe(true);

    // One each for the subscribed engineer and QA manager; not the engineer who switched it off, not the viewer.
    expect(mails.map((m) => m.to[0]!.address).sort()).toEqual(['engineer@example.test', 'qa_manager@example.test']);
    const mail = mails.find((m) => m.to[0]!.address === 'engineer@example.test')!;
    expect(mail.from[0]).toMatchObject({ address: 'gate@earmark.example', name: 'Earmark gate' });
    expect(mail.subject).toBe(`[Earmark] alpha-dsp build ${SHA} has errors: 1 failing cell, 1 erroring cell`);

    expect(mail.text).toContain('eq.bumped on board');
    expect(mail.text).toMatch(/Flat <±1 dB> & tight \(response\): measured \d+\.\d\d dB, limit 1\.00 dB, margin −\d+\.\d\d dB at \d+(\.\d+)? k?Hz/);
    expect(mail.text).toContain(`${stack.url}/projects/alpha-dsp/builds/${SHA}/captures/${failing.id}`);
    expect(mail.text).toContain('eq.short on board');
    expect(mail.text).toMatch(/the capture ends \d+ samples/);
    expect(mail.text).toContain(`${stack.url}/projects/alpha-dsp/builds/${SHA}/captures/${erroring.id}`);
    expect(mail.text).toContain(`${stack.url}/projects/alpha-dsp/builds/${SHA}`);
    expect(mail.text).not.toContain('eq.clean');
    expect(mail.text).not.toContain(passing.id);
    expect(mail.text).toContain('You get this because you subscribed to build-failure mail of Alpha DSP');

    // The HTML part carries the same content, escaped.
    expect(mail.html).toContain('Flat &lt;±1 dB&gt; &amp; tight');
    expect(mail.html).not.toContain('<±1 dB>');
    expect(mail.html).toContain(`href="${stack.url}/projects/alpha-dsp/builds/${SHA}/captures/${erroring.id}"`);
  });

  it('sends nothing more when a job of the build runs again', async () => {
    const boss = await startBoss(stack.workerEnv.EARMARK_DATABASE_URL!, pino({ level: 'silent' }));
    try {
      const jobId = await boss.send(QUEUES.analyzeCapture, { captureId: failing.id });
      expect(jobId).not.toBeNull();
      await until('the re-run job to complete', async () => (await boss.getJobById(QUEUES.analyzeCapture, jobId!))?.state === 'completed');
    } finally {
      await boss.stop({ graceful: false });
    }
    expect(await stack.orm.em.fork().count(Verdict, { capture: failing.id })).toBe(1);
    expect((await outboxRows()).map((n) => n.recipient).sort()).toEqual(['engineer@example.test', 'qa_manager@example.test']);
    await until('the outbox to drain', async () => (await stack.orm.em.fork().count(Notification, { state: 'pending' })) === 0);
    expect(await buildMails()).toHaveLength(2);
  });
});
