// Per-job overhead of an analysis slot: where a job's time goes besides the engine. Run: `npm run bench -- jobs`.
//
// A real worker process with one slot drains a queue of JOBS captures submitted through the API
// before it starts, for two capture shapes:
//   scale — the scale-out test's capture: 0.5 s sweep + 0.1 s silence, 48 kHz mono float32, one level check;
//   demo  — a typical demo capture: 2 s sweep + 0.3 s silence, 24-bit PCM, the demo's four checks.
// Builds of 5 captures, every sixth build failing (findings, the build-failure mail). Per job the
// worker logs its steps ("capture judged": steps, thread phases); pg-boss's share is the rest of
// the slot's cycle, from one job's start (pgboss.job.started_on) to the next one's.
import { StimulusSpec, type MaskCheckInput } from '@earmark/contracts';
import { MaskRevision, Target, TestCase, testCaseSettings } from '@earmark/db';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { addNoise, delay, scaleDb } from '@earmark/dsp/testing';
import fs from 'node:fs';
import os, { availableParallelism, loadavg } from 'node:os';
import path from 'node:path';
import { createBenchDatabase } from '../support/bench-database.js';
import { startStack } from '../support/stack.js';

const FS = 48000;
const JOBS = Number(process.env.EARMARK_BENCH_JOBS ?? 60);
const PER_BUILD = 5;
/** The first jobs load the slot's modules and connections: left out of the medians. */
const WARM_UP = 3;

interface Shape {
  key: string;
  label: string;
  spec: StimulusSpec;
  checks: MaskCheckInput[];
  wav(gainDb: number, seed: number): Buffer<ArrayBuffer>;
}

const scaleSpec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 0.5, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.1, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const scalePlayed = Float64Array.from(generateStimulus(scaleSpec).channels[0]!, Math.fround);
const demoSpec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 2, levelDbfs: -12, from: 20, to: 20000, silenceSeconds: 0.3, fadeInSeconds: 0.02, fadeOutSeconds: 0.02 });
const demoPlayed = generateStimulus(demoSpec).channels[0]!;
const SHAPES: Shape[] = [
  {
    key: 'scale',
    label: '0.5 s sweep, float32, 1 level check',
    spec: scaleSpec,
    checks: [{ id: 'level', kind: 'level', metric: 'rms-dbfs', min: -22, max: -10 }],
    wav: (gainDb) => Buffer.from(encodeWav([scaleDb(scalePlayed, gainDb)], FS, { encoding: 'float', bitsPerSample: 32 })),
  },
  {
    key: 'demo',
    label: '2 s sweep, 24-bit, 4 checks',
    spec: demoSpec,
    checks: [
      { id: 'response', kind: 'magnitude-envelope', label: 'Within ±1.5 dB', measure: 'transfer', referenceHz: 1000, smoothing: 6, upper: [{ hz: 50, db: 1.5 }, { hz: 16000, db: 1.5 }], lower: [{ hz: 50, db: -1.5 }, { hz: 16000, db: -1.5 }] },
      { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -16, max: -10 },
      { id: 'no-clipping', kind: 'integrity', metric: 'clipped-samples', max: 0 },
      { id: 'latency', kind: 'timing', metric: 'latency-ms', max: 10 },
    ],
    // Half a millisecond of latency and a 24-bit converter's noise floor, as the demo's rig records.
    wav: (gainDb, seed) => Buffer.from(encodeWav([addNoise(scaleDb(delay(demoPlayed, 24), gainDb), -110, seed)], FS, { bitsPerSample: 24 })),
  },
];

const median = (xs: number[]) => (xs.length ? [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]! : NaN);

interface Judged {
  captureId: string;
  outcome: string;
  steps: Record<string, number>;
  phases?: Record<string, number>;
}

const database = await createBenchDatabase('earmark_job_overhead_bench');
const stack = await startStack({ database });
try {
  const em = stack.orm.em.fork();
  const project = stack.fixture.project;
  em.create(Target, { project: project.id, key: 'board', name: 'Board', sampleRate: FS });
  for (const shape of SHAPES) {
    const testCase = em.create(TestCase, { project: project.id, key: `bench.${shape.key}`, name: shape.label, stimulus: shape.spec });
    em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks: shape.checks, settings: testCaseSettings(testCase), author: stack.fixture.users.engineer.id, reviewer: stack.fixture.users.qa_manager.id });
  }
  await em.flush();

  const report: string[] = [];
  for (const [s, shape] of SHAPES.entries()) {
    // The queue first, with no worker: every capture waits, so the slot starts saturated.
    const captureIds = new Set<string>();
    for (let i = 0; i < JOBS; i++) {
      const build = Math.floor(i / PER_BUILD);
      const sha = `${(0xb0 + s).toString(16)}${build.toString(16).padStart(6, '0')}`;
      const gainDb = (build % 6 === 5 ? -20 : 0) + i * 0.001;
      const res = await fetch(`${stack.url}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=bench.${shape.key}&target=board`, {
        method: 'POST',
        body: shape.wav(gainDb, i + 1),
        headers: { authorization: `Bearer ${stack.ciToken}`, 'content-type': 'audio/wav', 'idempotency-key': `jobs-${shape.key}-${i}` },
      });
      if (res.status !== 202) throw new Error(`upload ${sha}: ${res.status} ${await res.text()}`);
      captureIds.add(((await res.json()) as { id: string }).id);
    }
    const load = loadavg()[0]!;
    const worker = await stack.startWorker({ EARMARK_ANALYSIS_SLOTS: '1', EARMARK_ANALYSIS_EXPIRE_S: '300', EARMARK_SWEEP_INTERVAL_S: '30' });
    const sql = `select extract(epoch from v.created_at) * 1000 as at, v.outcome from verdict v join capture c on c.id = v.capture_id join test_case t on t.id = c.test_case_id where t.key = 'bench.${shape.key}' order by v.created_at`;
    let verdicts: { at: string; outcome: string }[] = [];
    const deadline = Date.now() + 600_000;
    while (verdicts.length < JOBS && Date.now() < deadline) {
      await new Promise((resolve) => setTimeout(resolve, 250));
      verdicts = await stack.orm.em.fork().getConnection().execute(sql);
    }
    await worker.stop();
    if (verdicts.length < JOBS) throw new Error(`only ${verdicts.length} of ${JOBS} verdicts for ${shape.key}`);

    const judged = worker.output
      .join('')
      .split('\n')
      .filter((l) => l.includes('"capture judged"'))
      .map((l) => JSON.parse(l) as Judged)
      .filter((j) => captureIds.has(j.captureId));
    const started = await stack.orm.em.fork().getConnection().execute<{ capture_id: string; started: string }[]>(
      `select data->>'captureId' as capture_id, extract(epoch from started_on) * 1000 as started from pgboss.job where name = 'analyze-capture' and started_on is not null order by started_on`,
    );
    const startOf = new Map(started.filter((r) => captureIds.has(r.capture_id)).map((r) => [r.capture_id, Number(r.started)]));
    const order = [...startOf.entries()].sort((a, b) => a[1] - b[1]).map(([id]) => id);
    const byId = new Map(judged.map((j) => [j.captureId, j]));
    // One slot: the cycle is one job's start to the next one's; what the handler did not spend is pg-boss's (complete, fetch).
    const cycles: number[] = [];
    const queueShare: number[] = [];
    for (let i = WARM_UP; i + 1 < order.length; i++) {
      const cycle = startOf.get(order[i + 1]!)! - startOf.get(order[i]!)!;
      cycles.push(cycle);
      queueShare.push(cycle - byId.get(order[i]!)!.steps.totalMs!);
    }
    const measured = order.slice(WARM_UP).map((id) => byId.get(id)!);
    // The raw lines, for a closer look than the medians.
    fs.writeFileSync(path.join(os.tmpdir(), `earmark-job-overhead-${shape.key}.jsonl`), `${measured.map((j) => JSON.stringify(j)).join('\n')}\n`);
    // Laps in job order; plot store and drift run side by side inside "after the verdict".
    const stepNames = ['loadMs', 'markMs', 'objectMs', 'threadMs', 'recordMs', 'afterVerdictMs', 'plotStoreMs', 'driftMs', 'mailMs', 'totalMs'];
    const phaseNames = ['decodeMs', 'stimulusMs', 'judgeMs', 'plotMs'];
    const stepMedians = stepNames.map((n) => median(measured.map((j) => j.steps[n] ?? 0)));
    const phaseMedians = phaseNames.map((n) => median(measured.map((j) => j.phases?.[n] ?? 0)));
    const times = verdicts.map((v) => Number(v.at));
    const perSecond = ((JOBS - 1) * 1000) / (times[JOBS - 1]! - times[0]!);
    const notPass = verdicts.filter((v) => v.outcome !== 'pass').length;
    console.log(`${shape.key}: ${perSecond.toFixed(2)} verdicts/s, cycle ${median(cycles).toFixed(1)} ms (median of ${cycles.length}), not pass ${notPass}, load ${load.toFixed(1)}`);
    report.push(
      `| ${shape.label} | ${median(cycles).toFixed(1)} | ${median(queueShare).toFixed(1)} | ${stepMedians.map((m) => m.toFixed(1)).join(' | ')} | ${phaseMedians.map((m) => m.toFixed(1)).join(' | ')} | ${perSecond.toFixed(2)} | ${notPass} | ${load.toFixed(1)} |`,
    );
  }
  console.log(`\nRun ${new Date().toISOString()}, Node ${process.version}, ${availableParallelism()} cores, ${JOBS} jobs per shape (medians over jobs ${WARM_UP + 1}…), 1 slot.\n`);
  console.log('| capture | cycle | pg-boss (cycle − job) | load rows | mark analysing | object get (rest) | thread (main view) | record verdict | after verdict | ↳ plot store | ↳ drift | mail job | job total | decode | stimulus | judge | plot draw | verdicts/s | not pass | load avg |');
  console.log('|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|---|');
  for (const row of report) console.log(row);
} finally {
  await stack.close();
}
