import { Writable } from 'node:stream';
import { StimulusSpec, type AnalyzeCaptureJob, type EvaluateImpactJob, type MaskCheckInput } from '@earmark/contracts';
import { Build, Capture, CheckResult, MaskRevision, Target, TestCase, Verdict, testCaseSettings } from '@earmark/db';
import { useSeededDatabase } from '@earmark/db/testing';
import { ANALYSIS_THREAD_MODULE, createLinks, type JobProducer } from '@earmark/domain';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { delay } from '@earmark/dsp/testing';
import { createComputePool, type ComputePool, type ObjectStore } from '@earmark/platform';
import type PgBoss from 'pg-boss';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { analyzeCapture, type AnalyzeDeps } from '../src/jobs/analyze-capture.job.js';

const seeded = useSeededDatabase(4);
const FS = 48000;
/** 8 s of sweep: about a second of analysis, long enough for two to be seen overlapping. */
const longSweep = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 8, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.3, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const shortSweep = StimulusSpec.parse({ ...longSweep, seconds: 1 });
const checks: MaskCheckInput[] = [
  { id: 'response', kind: 'magnitude-envelope', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 100, db: -1 }, { hz: 16000, db: -1 }] },
  { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -16, max: -10 },
];

/** Stored objects in memory: the object store as the job reads it. */
const objects = new Map<string, Buffer>();
const objectStore = {
  get: async (key: string) => Buffer.from(objects.get(key)!),
  put: async (key: string, bytes: Buffer) => void objects.set(key, bytes),
} as unknown as ObjectStore;
const jobs: JobProducer = { analyzeCapture: async (_: AnalyzeCaptureJob) => 'job', evaluateImpact: async (_: EvaluateImpactJob) => 'job', sendMail: async () => 'job' };
const pools: ComputePool[] = [];
afterAll(() => Promise.all(pools.map((p) => p.destroy())));

/** The `capture judged` log lines, parsed. */
interface Judged { captureId: string; outcome: string; threadStartedAt?: number; threadEndedAt?: number; stimulus?: string }
function depsWith(slots: number, memoryMb: number): { deps: AnalyzeDeps; judged: Judged[] } {
  const judged: Judged[] = [];
  const lines = new Writable({
    write(chunk: Buffer, _enc, done) {
      for (const line of chunk.toString().split('\n').filter(Boolean)) {
        const entry = JSON.parse(line) as Judged & { msg: string };
        if (entry.msg === 'capture judged') judged.push(entry);
      }
      done();
    },
  });
  const pool = createComputePool({ module: ANALYSIS_THREAD_MODULE, threads: slots, minThreads: slots, maxQueue: slots, memoryMbPerThread: memoryMb });
  pools.push(pool);
  const deps: AnalyzeDeps = { orm: seeded.orm, objectStore, jobs, logger: pino({ level: 'info' }, lines), links: createLinks('http://earmark.test'), maxAttempts: 4, delayMs: 0, analysis: { pool, memoryMb } };
  return { deps, judged };
}

let seq = 0;
const testCases = new Map<string, TestCase>();
/** A queued capture of the stimulus of `spec` (37 samples late), with its approved mask and stored bytes. */
async function queuedCapture(spec: StimulusSpec): Promise<string> {
  const em = seeded.orm.em.fork();
  const { project } = seeded.fixture;
  const key = `slots.${spec.seconds}s`;
  let testCase = testCases.get(key);
  if (!testCase) {
    testCase = em.create(TestCase, { project: project.id, key, name: key, stimulus: spec });
    em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks, settings: testCaseSettings(testCase), author: seeded.fixture.users.engineer.id, reviewer: seeded.fixture.users.qa_manager.id });
    await em.flush();
    testCases.set(key, testCase);
  }
  const target = (await em.findOne(Target, { key: 'slots-board' })) ?? em.create(Target, { project: project.id, key: 'slots-board', name: 'Board', sampleRate: FS });
  seq += 1;
  const played = Float64Array.from(generateStimulus(spec).channels[0]!, Math.fround);
  const wav = Buffer.from(encodeWav([delay(played, 37)], FS, { encoding: 'float', bitsPerSample: 32 }));
  const objectKey = `slots/${seq}.wav`;
  objects.set(objectKey, wav);
  const build = em.create(Build, { project: project.id, sha: `51075${seq.toString().padStart(3, '0')}` });
  const capture = em.create(Capture, {
    project: project.id, build, testCase: testCase.id, target, objectKey, sha256: '0'.repeat(64), sizeBytes: wav.byteLength,
    format: { container: 'wav' }, sampleRate: FS, channelCount: 1, frames: played.length, status: 'queued',
  });
  await em.flush();
  return capture.id;
}

const jobFor = (captureId: string) => ({ id: `job-${captureId}`, name: 'analyze-capture', data: { captureId }, retryCount: 0 }) as unknown as PgBoss.JobWithMetadata<unknown>;
const verdictOf = (captureId: string) => seeded.orm.em.fork().findOneOrFail(Verdict, { capture: captureId });
/** Whether two analyses ran at the same time in their threads. */
const overlapped = ([a, b]: Judged[]) => Math.max(a!.threadStartedAt!, b!.threadStartedAt!) < Math.min(a!.threadEndedAt!, b!.threadEndedAt!);

describe('analysis slots', () => {
  let warmed: { deps: AnalyzeDeps; judged: Judged[] }[] = [];
  beforeAll(async () => {
    warmed = [depsWith(2, 1024), depsWith(1, 1024)];
    // Thread start-up (loading the engine) is not what these tests time.
    await Promise.all(warmed.flatMap(({ deps }) => [deps.analysis.pool.run('warm', {}), deps.analysis.pool.run('warm', {})]));
  }, 60_000);

  it('runs two analyses at the same time with two slots, and one after the other with one', async () => {
    const [two, one] = warmed as [(typeof warmed)[0], (typeof warmed)[0]];
    const pair = [await queuedCapture(longSweep), await queuedCapture(longSweep)];
    await Promise.all(pair.map((id) => analyzeCapture(jobFor(id), two.deps)));
    expect(two.judged.map((j) => j.outcome)).toEqual(['pass', 'pass']);
    expect(overlapped(two.judged)).toBe(true);

    const serial = [await queuedCapture(longSweep), await queuedCapture(longSweep)];
    await Promise.all(serial.map((id) => analyzeCapture(jobFor(id), one.deps)));
    expect(one.judged.map((j) => j.outcome)).toEqual(['pass', 'pass']);
    expect(overlapped(one.judged)).toBe(false);
    for (const id of [...pair, ...serial]) expect((await verdictOf(id)).outcome).toBe('pass');
  }, 60_000);

  it('builds the stimulus of a spec once per thread and reuses it for the next captures', async () => {
    const { deps, judged } = depsWith(1, 1024);
    const ids = [await queuedCapture(shortSweep), await queuedCapture(shortSweep), await queuedCapture(shortSweep), await queuedCapture(longSweep)];
    for (const id of ids) await analyzeCapture(jobFor(id), deps);
    expect(judged.map((j) => j.stimulus)).toEqual(['built', 'cached', 'cached', 'built']);
    // The cached reference judges exactly as a fresh one: same outcome and same measured values.
    const measured = await Promise.all(ids.slice(0, 3).map(async (id) => (await seeded.orm.em.fork().find(CheckResult, { verdict: await verdictOf(id) }, { orderBy: { checkId: 'asc' } })).map((c) => [c.checkId, c.measured])));
    expect(measured[1]).toEqual(measured[0]);
    expect(measured[2]).toEqual(measured[0]);
  }, 60_000);

  it("stores the capture page's default plot from the thread, drawn against the mask that judged it", async () => {
    const { deps } = depsWith(1, 1024);
    const id = await queuedCapture(shortSweep);
    await analyzeCapture(jobFor(id), deps);
    const verdict = await verdictOf(id);
    const key = [...objects.keys()].find((k) => k.startsWith(`plot-cache/${id}/`));
    expect(key).toContain(`-${verdict.maskRevision!.id}-`);
    const stored = JSON.parse(objects.get(key!)!.toString('utf8')) as { plot: { checkId: string; unit: string; spectrum: { hz: number[] }; worst: unknown } };
    // The envelope check drawn, in dB, over the audio band; a passing capture has no worst failing point.
    expect(stored.plot.checkId).toBe('response');
    expect(stored.plot.unit).toBe('dB');
    expect(stored.plot.spectrum.hz.length).toBeGreaterThan(100);
    expect(stored.plot.worst).toBeNull();
  }, 60_000);

  it('judges error, once, a capture whose thread outgrows its memory budget', async () => {
    // 16 MB of V8 heap does not even hold the engine's modules: the thread dies in its first task.
    const { deps } = depsWith(1, 16);
    const id = await queuedCapture(shortSweep);
    await analyzeCapture(jobFor(id), deps);
    const verdict = await verdictOf(id);
    expect(verdict.outcome).toBe('error');
    expect(verdict.reason).toBe('Analysis stopped: the analysis needed more than 16 MB (EARMARK_ANALYSIS_MEMORY_MB, the memory budget of one analysis slot).');
    expect((await seeded.orm.em.fork().findOneOrFail(Capture, { id })).status).toBe('error');
  }, 60_000);

  it('refuses before analysing a capture that would need more than the budget', async () => {
    // 20.3 s of mono is 974,400 samples: about 78 MiB of analysis at the measured 84 bytes per sample.
    // 64 MB holds the thread's modules (48 MB does, 32 MB does not), so the refusal is the task's own.
    const { deps, judged } = depsWith(1, 64);
    const id = await queuedCapture(StimulusSpec.parse({ ...longSweep, seconds: 20 }));
    await analyzeCapture(jobFor(id), deps);
    expect((await verdictOf(id)).reason).toMatch(/^Analysis stopped: the analysis needed more than 64 MB/);
    // The thread answered (it did not die) and never built the stimulus.
    expect(judged).toHaveLength(1);
    expect(judged[0]!.stimulus).toBeNull();
  }, 60_000);
});
