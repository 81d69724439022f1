import { Capture, MaskRevision, Notification, Target, TestCase, Verdict, testCaseSettings } from '@earmark/db';
import { StimulusSpec, type CaptureDto, type MaskCheckInput } from '@earmark/contracts';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { applyBiquad, applyFir, clip, delay, lowPassBiquadCoefficients, peakingEqCoefficients, scaleDb, windowedSincLowPass } from '@earmark/dsp/testing';
import { XMLParser } from 'fast-xml-parser';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import type { WorkerProcess } from '../support/worker-process.js';
import { waitFor } from '../support/wait-for.js';

/**
 * The main job end to end: CI uploads captures over the API, the object lands in the S3
 * fake, a real worker process analyses it against the approved mask, and the verdict,
 * build aggregate, JUnit XML and e-mail come out — with PostgreSQL, S3 and SMTP fakes real.
 */
let stack: Stack;
let worker: WorkerProcess;
const FS = 48000;
const sweepSpec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 1.5, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.3, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const stimulus = Float64Array.from(generateStimulus(sweepSpec).channels[0]!, Math.fround);
const LATENCY = 37; // samples the "firmware" adds

const responseMask: MaskCheckInput[] = [
  { id: 'response', kind: 'magnitude-envelope', label: 'Flat ±1 dB', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 100, db: -1 }, { hz: 16000, db: -1 }] },
  { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -16, max: -10 },
  { id: 'clipping', kind: 'integrity', metric: 'clipped-samples', max: 0 },
  { id: 'parseval', kind: 'level', metric: 'energy-parseval', max: 1e-9 },
];
// Band by default: where |H| is within 20 dB of its maximum, so the low-pass corner is inside it.
const phaseMask: MaskCheckInput[] = [{ id: 'phase', kind: 'phase-linearity', maxDeviationDeg: 10 }];

async function api(method: string, path: string, body?: BodyInit, headers: Record<string, string> = {}) {
  const res = await fetch(`${stack.url}${path}`, { method, body, headers: { authorization: `Bearer ${stack.ciToken}`, ...headers } });
  return { status: res.status, text: await res.text() };
}

async function submit(sha: string, testCase: string, samples: Float64Array): Promise<CaptureDto> {
  const wav = encodeWav([samples], FS, { encoding: 'float', bitsPerSample: 32 });
  const res = await api('POST', `/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=${testCase}&target=board`, Buffer.from(wav), { 'content-type': 'audio/wav' });
  expect(res.status, res.text).toBe(202);
  return JSON.parse(res.text) as CaptureDto;
}

const workerSaid = (chars = 3000) => () => `worker said:\n${worker.output.join('').slice(-chars)}`;

async function verdictOf(id: string, timeoutMs = 30_000): Promise<CaptureDto> {
  return waitFor(
    async () => {
      const capture = JSON.parse((await api('GET', `/api/v1/captures/${id}`)).text) as CaptureDto;
      return capture.verdict ? capture : null;
    },
    { what: `a verdict for capture ${id}`, timeoutMs, intervalMs: 150, context: workerSaid() },
  );
}

const check = (c: CaptureDto, id: string) => c.verdict!.checks.find((x) => x.id === id)!;

async function inbox(): Promise<{ to: { address: string }[]; subject: string; text: string }[]> {
  const res = await fetch(`${stack.smtp.inboxUrl}api/email`);
  return (await res.json()) as never;
}

beforeAll(async () => {
  stack = await startStack();
  const em = stack.orm.em.fork();
  const project = stack.fixture.project;
  em.create(Target, { project: project.id, key: 'board', name: 'Board', sampleRate: FS });
  const eq = em.create(TestCase, { project: project.id, key: 'eq.sweep', name: 'EQ sweep', stimulus: sweepSpec });
  const phase = em.create(TestCase, { project: project.id, key: 'phase.sweep', name: 'Phase sweep', stimulus: sweepSpec });
  em.create(MaskRevision, { testCase: eq, revision: 1, state: 'approved', checks: responseMask, settings: testCaseSettings(eq), author: stack.fixture.users.engineer.id, reviewer: stack.fixture.users.qa_manager.id });
  em.create(MaskRevision, { testCase: phase, revision: 1, state: 'approved', checks: phaseMask, settings: testCaseSettings(phase), author: stack.fixture.users.engineer.id, reviewer: stack.fixture.users.qa_manager.id });
  await em.flush();
  worker = await stack.startWorker();
}, 120_000);
afterAll(() => stack?.close());

describe('capture → verdict', () => {
  let clean: CaptureDto;
  let bump: CaptureDto;
  let clipped: CaptureDto;
  let quiet: CaptureDto;

  it('passes a clean capture and records the engine version and mask revision', async () => {
    clean = await verdictOf((await submit('aaaa001', 'eq.sweep', delay(stimulus, LATENCY))).id);
    expect(clean.verdict!.outcome, JSON.stringify(clean.verdict)).toBe('pass');
    expect(clean.verdict!.engineVersion).toMatch(/^\d+\.\d+\.\d+$/);
    expect(clean.verdict!.maskRevision).toBe(1);
    // The worker records the settings it judged with: revision 1's, with the schema's defaults filled in.
    expect(clean.verdict!.settings).toEqual({ stimulus: sweepSpec, analysis: {}, channelMap: [] });
    expect(check(clean, 'parseval').pass).toBe(true);
    expect(check(clean, 'response').margin!).toBeGreaterThan(0.5);
  });

  it('fails a +2 dB peaking bump at 8 kHz on the envelope, worst near 8 kHz, margin about −1 dB', async () => {
    // RBJ Audio EQ Cookbook peaking filter: |H(8 kHz)| = +2 dB exactly, so the ±1 dB envelope is exceeded by ~1 dB.
    const bumped = applyBiquad(delay(stimulus, LATENCY), peakingEqCoefficients(FS, 8000, 2, 2));
    bump = await verdictOf((await submit('bbbb002', 'eq.sweep', bumped)).id);
    expect(bump.verdict!.outcome).toBe('fail');
    const response = check(bump, 'response');
    expect(response.pass).toBe(false);
    expect(response.worstHz!).toBeGreaterThan(8000 * 0.95);
    expect(response.worstHz!).toBeLessThan(8000 * 1.05);
    expect(response.margin!).toBeGreaterThan(-1.15);
    expect(response.margin!).toBeLessThan(-0.85);
    expect(check(bump, 'level').pass).toBe(true);
  });

  it('fails a clipped capture on time-domain integrity', async () => {
    // +14 dB on a −12 dBFS sweep drives the peak to +2 dBFS: hard-clipped at full scale.
    clipped = await verdictOf((await submit('bbbb002', 'eq.sweep', clip(scaleDb(delay(stimulus, LATENCY), 14), 1))).id);
    expect(clipped.verdict!.outcome).toBe('fail');
    const clipping = check(clipped, 'clipping');
    expect(clipping.pass).toBe(false);
    expect(clipping.measured!).toBeGreaterThan(100);
  });

  it('fails a −20 dB level change on the level check with the overshoot as margin', async () => {
    quiet = await verdictOf((await submit('bbbb002', 'eq.sweep', scaleDb(delay(stimulus, LATENCY), -20))).id);
    const level = check(quiet, 'level');
    expect(level.pass).toBe(false);
    // RMS of the clean capture is about −13 dBFS (−12 dBFS sweep, with silence and fades), so −20 dB reads about −33 dBFS: 17 dB below the −16 dBFS minimum.
    const cleanLevel = check(clean, 'level').measured!;
    expect(level.measured!).toBeCloseTo(cleanLevel - 20, 1);
    expect(level.margin!).toBeCloseTo(level.measured! - -16, 6);
    expect(check(quiet, 'response').pass).toBe(true); // the shape is unchanged
  });

  it('passes a linear-phase filter and fails a minimum-phase one on phase linearity', async () => {
    const fir = applyFir(stimulus, windowedSincLowPass(FS, 4000, 63));
    const minimum = applyBiquad(stimulus, lowPassBiquadCoefficients(FS, 4000));
    const linear = await verdictOf((await submit('cccc003', 'phase.sweep', fir)).id);
    const bent = await verdictOf((await submit('cccc003', 'phase.sweep', minimum)).id);
    expect(check(linear, 'phase').pass, JSON.stringify(check(linear, 'phase'))).toBe(true);
    expect(check(bent, 'phase').pass, JSON.stringify(check(bent, 'phase'))).toBe(false);
  });

  it('aggregates the build verdict and renders JUnit XML carrying the failures', async () => {
    const passing = JSON.parse((await api('GET', '/api/v1/projects/alpha-dsp/builds/aaaa001')).text);
    expect(passing.status).toBe('pass');
    const failing = JSON.parse((await api('GET', '/api/v1/projects/alpha-dsp/builds/bbbb002')).text);
    expect(failing.status).toBe('fail');
    expect(failing.counts).toEqual({ pass: 0, fail: 3, error: 0, pending: 0, waived: 0 });

    const xml = (await api('GET', '/api/v1/projects/alpha-dsp/builds/bbbb002/junit.xml')).text;
    const parsed = new XMLParser({ ignoreAttributes: false }).parse(xml);
    const suites = [parsed.testsuites.testsuite].flat();
    expect(suites).toHaveLength(1);
    const cases = [suites[0].testcase].flat() as { '@_name': string; failure?: { '#text'?: string; '@_message'?: string } }[];
    expect(cases).toHaveLength(3 * responseMask.length);
    const failures = cases.filter((c) => c.failure);
    expect(failures.length).toBeGreaterThanOrEqual(3);
    const envelopeFailure = failures.find((c) => c['@_name'].startsWith('response'))!;
    expect(JSON.stringify(envelopeFailure.failure)).toMatch(/margin [\u2212+]?\d+\.\d\d dB at \d+(\.\d+)? k?Hz/);
  });

  it('opens one finding per failing check and e-mails each subscriber (engineer and QA manager by default) once', async () => {
    const em = stack.orm.em.fork();
    const findings = await em.getConnection().execute<{ check_id: string }[]>(`select check_id from finding order by check_id`);
    expect(findings.map((f) => f.check_id)).toEqual(expect.arrayContaining(['clipping', 'level', 'response', 'phase']));
    const mails = await waitFor(
      async () => {
        const all = await inbox();
        return all.filter((m) => m.subject.includes('bbbb002')).length >= 2 ? all : null;
      },
      { what: "two build-failed mails for bbbb002 in the SMTP fake's inbox", timeoutMs: 15_000, intervalMs: 200, context: workerSaid() },
    );
    const failedMail = mails.filter((m) => m.subject.includes('bbbb002'));
    // The build's status was final (and failing) once; the viewer is not subscribed.
    expect(failedMail.map((m) => m.to[0]!.address).sort()).toEqual(['engineer@example.test', 'qa_manager@example.test']);
    expect(failedMail[0]!.text).toContain('/projects/alpha-dsp/builds/bbbb002');
    expect(failedMail[0]!.text).toContain('eq.sweep on board');
    expect(failedMail[0]!.text, failedMail[0]!.text).toMatch(/Flat ±1 dB \(response\): measured \d+\.\d\d dB, limit 1\.00 dB, margin −\d+\.\d\d dB at \d+(\.\d+)? k?Hz/);
  });
});

describe('failure and recovery', () => {
  it('re-runs a job whose worker was killed with SIGKILL mid-analysis, and writes exactly one verdict', async () => {
    await worker.stop();
    const slow = await stack.startWorker({ EARMARK_ANALYSIS_DELAY_MS: '60000' });
    const submitted = await submit('dddd004', 'eq.sweep', delay(stimulus, LATENCY));
    const em = stack.orm.em.fork();
    await waitFor(async () => (await em.fork().findOneOrFail(Capture, { id: submitted.id })).status === 'analysing', {
      what: `the slow worker to start analysing capture ${submitted.id}`,
      timeoutMs: 20_000,
      context: workerSaid(),
    });
    await slow.kill();
    worker = await stack.startWorker();
    const judged = await verdictOf(submitted.id, 60_000);
    expect(judged.verdict!.outcome).toBe('pass');
    expect(await em.fork().count(Verdict, { capture: submitted.id })).toBe(1);
  });

  it('keeps mail in the outbox while the SMTP server is down and delivers it when it returns', async () => {
    await stack.smtp.stop();
    const bumped = applyBiquad(delay(stimulus, LATENCY), peakingEqCoefficients(FS, 8000, 2, 2));
    const failed = await verdictOf((await submit('eeee005', 'eq.sweep', bumped)).id);
    expect(failed.verdict!.outcome).toBe('fail');
    const em = stack.orm.em.fork();
    const pending = await em.find(Notification, { subject: { $like: '%eeee005%' } }, { orderBy: { recipient: 'asc' } });
    expect(pending.map((n) => n.recipient)).toEqual(['engineer@example.test', 'qa_manager@example.test']);
    // Give the worker time to try (and fail) at least once: an unreachable relay is noted on the
    // row but charges no attempt (only a message the relay refuses counts towards giving up).
    await waitFor(async () => (await em.fork().find(Notification, { id: { $in: pending.map((n) => n.id) } })).some((n) => n.lastError !== null), {
      what: 'the worker to try (and fail) to send the eeee005 mail',
      timeoutMs: 10_000,
      intervalMs: 200,
      context: workerSaid(),
    });
    const tried = await em.fork().find(Notification, { id: { $in: pending.map((n) => n.id) } });
    expect(tried.map((n) => [n.state, n.attempts])).toEqual([['pending', 0], ['pending', 0]]);

    await stack.smtp.restart();
    await waitFor(
      async () => {
        const mails = await inbox().catch(() => []);
        const sent = await em.fork().count(Notification, { id: { $in: pending.map((n) => n.id) }, state: 'sent' });
        return mails.filter((m) => m.subject.includes('eeee005')).length === 2 && sent === 2;
      },
      { what: 'both eeee005 mails delivered after the SMTP fake returned', timeoutMs: 30_000, intervalMs: 300, context: workerSaid(2000) },
    );
  });
});

describe('a capture whose analysis keeps dying', () => {
  it('is judged error after the last attempt instead of staying pending', async () => {
    await worker.stop();
    // Every analysis hangs (fault injection) and expires after 2 s; the second attempt is the last.
    const hanging = await stack.startWorker({ EARMARK_ANALYSIS_DELAY_MS: '60000', EARMARK_ANALYSIS_EXPIRE_S: '2', EARMARK_ANALYSIS_MAX_ATTEMPTS: '2', EARMARK_ANALYSIS_SLOTS: '2' });
    try {
      const submitted = await submit('ffff006', 'eq.sweep', delay(stimulus, LATENCY));
      const judged = await verdictOf(submitted.id, 45_000);
      expect(judged.verdict!.outcome).toBe('error');
      expect(judged.verdict!.reason).toMatch(/abandoned after 1 failed attempt \(/);
      expect(judged.status).toBe('error');
    } finally {
      // A failure here must not leave a hanging worker to take the next tests' jobs.
      await hanging.kill();
      worker = await stack.startWorker();
    }
  });
});

describe('earmark submit against the real stack', () => {
  // fileURLToPath, not .pathname: a clone in a folder with a space would give %20.
  const cli = fileURLToPath(new URL('../../apps/cli/bin/earmark.mjs', import.meta.url));

  async function runSubmit(sha: string, file: string, extra: string[] = []) {
    const { spawn } = await import('node:child_process');
    const child = spawn(process.execPath, [cli, 'submit', '--project', 'alpha-dsp', '--sha', sha, '--case', 'eq.sweep', '--target', 'board', file, '--wait', '--timeout', '60', ...extra], {
      env: { ...process.env, EARMARK_URL: stack.url, EARMARK_TOKEN: stack.ciToken },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    child.stdout.on('data', (c: Buffer) => (out += c.toString()));
    child.stderr.on('data', (c: Buffer) => (out += c.toString()));
    const code = await new Promise<number | null>((resolve) => child.once('exit', resolve));
    return { code, out };
  }

  async function writeWav(name: string, samples: Float64Array): Promise<string> {
    const fs = await import('node:fs');
    const os = await import('node:os');
    const path = await import('node:path');
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-submit-'));
    const file = path.join(dir, name);
    fs.writeFileSync(file, encodeWav([samples], FS, { encoding: 'float', bitsPerSample: 32 }));
    return file;
  }

  it('exits 0 for a passing build and writes JUnit XML', async () => {
    const file = await writeWav('clean.wav', delay(stimulus, LATENCY));
    const junit = `${file}.junit.xml`;
    const { code, out } = await runSubmit('f0f0f0a', file, ['--junit', junit]);
    expect(code, out).toBe(0);
    expect(out).toMatch(/PASS/);
    const fs = await import('node:fs');
    expect(fs.readFileSync(junit, 'utf8')).toContain('<testsuite');
  });

  it('exits 1 for a failing build and names the failing check', async () => {
    const file = await writeWav('bump.wav', applyBiquad(delay(stimulus, LATENCY), peakingEqCoefficients(FS, 8000, 2, 2)));
    const { code, out } = await runSubmit('f0f0f0b', file);
    expect(code, out).toBe(1);
    expect(out).toMatch(/FAIL/);
    expect(out).toMatch(/Flat ±1 dB: measured \d+\.\d\d dB, limit 1\.00 dB, margin −\d+\.\d\d dB at /); // the check's label, with its negative margin
  });
});
