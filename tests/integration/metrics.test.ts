import { randomUUID } from 'node:crypto';
import { MaskRevision, Target, TestCase, testCaseSettings } from '@earmark/db';
import { QUEUES, StimulusSpec, type CaptureDto, type MaskCheckInput } from '@earmark/contracts';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { applyBiquad, peakingEqCoefficients } from '@earmark/dsp/testing';
import { startMetricsServer, type MetricsServer } from '@earmark/platform';
import { createWorker, loadWorkerEnv, type Worker } from '@earmark/worker';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';

/**
 * The metrics ports of an API and a worker (in process, real database, S3 and SMTP fakes)
 * around a small pipeline: two captures of one build, one failing its mask. The counters move
 * by exactly what happened; the gauges read from the database are there with numbers.
 */
let stack: Stack;
let worker: Worker;
let apiPort: MetricsServer;
let workerPort: MetricsServer;
const SHA = 'a11ce5ed';
const FS = 48000;
const UPLOAD_ROUTE = '/api/v1/projects/:project/builds/:sha/captures';
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 1, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.2, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const stimulus = Float64Array.from(generateStimulus(spec).channels[0]!, Math.fround);
const mask: MaskCheckInput[] = [
  { id: 'response', kind: 'magnitude-envelope', label: 'Flat within 1 dB', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 100, db: -1 }, { hz: 16000, db: -1 }] },
];

interface Sample {
  name: string;
  labels: Record<string, string>;
  value: number;
}

/** The Prometheus text format, simply: one sample per line that is not a comment. */
function parseExposition(text: string): Sample[] {
  const samples: Sample[] = [];
  for (const line of text.split('\n')) {
    if (!line || line.startsWith('#')) continue;
    const match = /^([a-zA-Z_:][a-zA-Z0-9_:]*)(?:\{(.*)\})? (\S+)$/.exec(line);
    if (!match) throw new Error(`not a sample line: ${line}`);
    const labels: Record<string, string> = {};
    for (const [, key, raw] of (match[2] ?? '').matchAll(/([a-zA-Z_][a-zA-Z0-9_]*)="((?:[^"\\]|\\.)*)"/g)) labels[key!] = raw!.replace(/\\(.)/g, (_, c: string) => (c === 'n' ? '\n' : c));
    samples.push({ name: match[1]!, labels, value: Number(match[3]) });
  }
  return samples;
}

async function scrape(port: MetricsServer) {
  const res = await fetch(`http://127.0.0.1:${port.port}/metrics`);
  expect(res.status).toBe(200);
  expect(res.headers.get('content-type')).toMatch(/^text\/plain; version=0\.0\.4/);
  const samples = parseExposition(await res.text());
  const matching = (name: string, labels: Record<string, string> = {}) => samples.filter((s) => s.name === name && Object.entries(labels).every(([k, v]) => s.labels[k] === v));
  /** The sum over every series of `name` with these labels (0 when there is none). */
  const sum = (name: string, labels: Record<string, string> = {}) => matching(name, labels).reduce((total, s) => total + s.value, 0);
  return { samples, matching, sum };
}

async function submit(testCase: string, samples: Float64Array): Promise<{ capture: CaptureDto; bytes: number }> {
  const wav = Buffer.from(encodeWav([samples], FS, { encoding: 'float', bitsPerSample: 32 }));
  const res = await fetch(`${stack.url}/api/v1/projects/alpha-dsp/builds/${SHA}/captures?testCase=${testCase}&target=board`, {
    method: 'POST',
    headers: { authorization: `Bearer ${stack.ciToken}`, 'content-type': 'audio/wav' },
    body: wav,
  });
  expect(res.status, await res.clone().text()).toBe(202);
  return { capture: (await res.json()) as CaptureDto, bytes: wav.byteLength };
}

async function verdictOf(captureId: string): Promise<string> {
  for (let i = 0; i < 6; i++) {
    const res = await fetch(`${stack.url}/api/v1/captures/${captureId}?wait=20`, { headers: { authorization: `Bearer ${stack.ciToken}` } });
    const dto = (await res.json()) as CaptureDto;
    if (dto.verdict) return dto.verdict.outcome;
  }
  throw new Error(`no verdict for ${captureId}`);
}

beforeAll(async () => {
  stack = await startStack();
  const em = stack.orm.em.fork();
  const project = stack.fixture.project;
  em.create(Target, { project: project.id, key: 'board', name: 'Board', sampleRate: FS });
  for (const key of ['eq.bumped', 'eq.clean']) {
    const testCase = em.create(TestCase, { project: project.id, key, name: key, stimulus: spec });
    em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks: mask, settings: testCaseSettings(testCase), author: stack.fixture.users.engineer.id, reviewer: stack.fixture.users.qa_manager.id });
  }
  await em.flush();
  worker = await createWorker(loadWorkerEnv({ ...stack.workerEnv, EARMARK_LOG_LEVEL: 'silent' }), pino({ level: 'silent' }), { instanceName: 'worker-under-test' });
  await worker.start();
  apiPort = await startMetricsServer({ host: '127.0.0.1', port: 0, registry: stack.apiRuntime.metrics, live: stack.apiRuntime.health.live, ready: stack.apiRuntime.health.ready });
  workerPort = await startMetricsServer({ host: '127.0.0.1', port: 0, registry: worker.metrics, live: worker.health.live, ready: worker.health.ready });
}, 120_000);

afterAll(async () => {
  await apiPort?.close();
  await workerPort?.close();
  await worker?.stop();
  await stack?.close();
});

describe('metrics of a small pipeline', () => {
  it('move by exactly the uploads, verdicts and analyses that happened', async () => {
    const api0 = await scrape(apiPort);
    const worker0 = await scrape(workerPort);

    const failing = await submit('eq.bumped', applyBiquad(stimulus, peakingEqCoefficients(FS, 8000, 2, 2)));
    const passing = await submit('eq.clean', stimulus);
    expect(await verdictOf(failing.capture.id)).toBe('fail');
    expect(await verdictOf(passing.capture.id)).toBe('pass');

    const api1 = await scrape(apiPort);
    const worker1 = await scrape(workerPort);
    const moved = (before: typeof api0, after: typeof api0, name: string, labels: Record<string, string> = {}) => after.sum(name, labels) - before.sum(name, labels);

    // API: two uploads accepted, by the route template, with the files' bytes.
    expect(moved(api0, api1, 'earmark_http_requests_total', { method: 'POST', route: UPLOAD_ROUTE, status: '202' })).toBe(2);
    expect(moved(api0, api1, 'earmark_http_request_duration_seconds_count', { method: 'POST', route: UPLOAD_ROUTE })).toBe(2);
    expect(moved(api0, api1, 'earmark_capture_uploads_total', { outcome: 'accepted' })).toBe(2);
    expect(moved(api0, api1, 'earmark_capture_uploads_total', { outcome: 'refused' })).toBe(0);
    expect(moved(api0, api1, 'earmark_capture_upload_bytes_total')).toBe(failing.bytes + passing.bytes);
    expect(api1.matching('earmark_http_requests_total', { route: '/api/v1/captures/:id' }).length).toBeGreaterThan(0);
    expect(api1.samples.some((s) => s.labels.route?.includes(failing.capture.id))).toBe(false);

    // Worker: one failing and one passing verdict, two analyses timed, two analysis jobs done.
    expect(moved(worker0, worker1, 'earmark_verdicts_total', { outcome: 'fail' })).toBe(1);
    expect(moved(worker0, worker1, 'earmark_verdicts_total', { outcome: 'pass' })).toBe(1);
    expect(moved(worker0, worker1, 'earmark_verdicts_total', { outcome: 'error' })).toBe(0);
    expect(moved(worker0, worker1, 'earmark_analysis_duration_seconds_count')).toBe(2);
    expect(moved(worker0, worker1, 'earmark_analysis_duration_seconds_count', { outcome: 'fail' })).toBe(1);
    expect(worker1.sum('earmark_analysis_duration_seconds_sum')).toBeGreaterThan(0);
    expect(moved(worker0, worker1, 'earmark_jobs_total', { queue: 'analyze-capture', result: 'completed' })).toBe(2);
    expect(moved(worker0, worker1, 'earmark_jobs_total', { queue: 'analyze-capture', result: 'failed' })).toBe(0);

    // Each process labels its series with its kind and instance.
    expect(worker1.matching('earmark_verdicts_total', { outcome: 'fail' })[0]!.labels).toMatchObject({ process: 'worker', instance: 'worker-under-test' });
    expect(api1.matching('earmark_capture_uploads_total', { outcome: 'accepted' })[0]!.labels.process).toBe('api');
  }, 120_000);

  it('serve the queue and outbox gauges from both processes, with numbers', async () => {
    // A job due in an hour waits in `created` without being fetched: the depth and the age see it.
    const boss = stack.apiRuntime.boss;
    const parked = await boss.send(QUEUES.evaluateImpact, { impactRunId: randomUUID() }, { startAfter: 3600 });
    await new Promise((r) => setTimeout(r, 1100));
    for (const port of [apiPort, workerPort]) {
      const { matching } = await scrape(port);
      expect(matching('earmark_queue_depth', { queue: QUEUES.evaluateImpact, state: 'created' })[0]!.value).toBe(1);
      expect(matching('earmark_queue_oldest_age_seconds', { queue: QUEUES.evaluateImpact })[0]!.value).toBeGreaterThanOrEqual(1);
    }
    await boss.deleteJob(QUEUES.evaluateImpact, parked!);
    expect((await scrape(apiPort)).matching('earmark_queue_depth', { queue: QUEUES.evaluateImpact, state: 'created' })[0]!.value).toBe(0);

    for (const port of [apiPort, workerPort]) {
      const { matching } = await scrape(port);
      for (const state of ['created', 'retry', 'active']) {
        const series = matching('earmark_queue_depth', { queue: 'analyze-capture', state });
        expect(series, `queue depth ${state}`).toHaveLength(1);
        expect(Number.isFinite(series[0]!.value) && series[0]!.value >= 0).toBe(true);
      }
      const queues = matching('earmark_queue_oldest_age_seconds').map((s) => s.labels.queue).sort();
      expect(queues).toEqual(expect.arrayContaining(['analyze-capture', 'analyze-capture.dead', 'evaluate-impact', 'send-notifications']));
      expect(queues.filter((q) => q?.startsWith('__pgboss__'))).toEqual([]);
      expect(matching('earmark_queue_oldest_age_seconds').every((s) => s.value >= 0)).toBe(true);
      const outbox = Object.fromEntries(matching('earmark_mail_outbox_depth').map((s) => [s.labels.status, s.value]));
      expect(Object.keys(outbox).sort()).toEqual(['failed', 'pending']);
      expect(outbox.failed).toBe(0);
      expect(matching('earmark_scrape_query_failures_total')).toEqual([]);
    }
  });

  it('count the build-failure mail the worker sent', async () => {
    // The failing build mails its subscribers (the fixture's engineer and QA manager).
    const deadline = Date.now() + 30_000;
    let sent = 0;
    while (Date.now() < deadline && (sent = (await scrape(workerPort)).sum('earmark_mails_sent_total', { result: 'sent' })) < 2) await new Promise((r) => setTimeout(r, 200));
    expect(sent).toBe(2);
    const { matching } = await scrape(apiPort);
    expect(matching('earmark_mail_outbox_depth', { status: 'pending' })[0]!.value).toBe(0);
  });

  it('answer ready on both metrics ports', async () => {
    for (const port of [apiPort, workerPort]) {
      const res = await fetch(`http://127.0.0.1:${port.port}/readyz`);
      expect([res.status, await res.json()]).toEqual([200, { ready: true, draining: false, checks: { database: 'ok', queue: 'ok', objectStore: 'ok' }, errors: {} }]);
      expect((await fetch(`http://127.0.0.1:${port.port}/livez`)).status).toBe(200);
    }
  });
});
