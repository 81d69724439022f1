// Analysis slots: how close one worker process gets to N cores of engine. Run: `npm run bench -- worker`.
//
// (1) Engine alone, one core: decode + mask evaluation of a 1.0 MB capture on this thread, the
//     stimulus built once (what a slot does once its cache holds the stimulus), and with the
//     stimulus rebuilt per capture (what the worker did before the cache).
// (2) The service: the real stack (API in this process, PostgreSQL, the S3 fake) and a real worker
//     process with 1, then 2 slots, draining a queue of CAPTURES captures submitted through the API
//     before the worker starts. Verdicts/s at saturation come from the verdicts' own timestamps,
//     from the slots-th verdict to the last (the first ones include thread and connection start-up).
// Efficiency = verdicts/s ÷ (engine-alone captures/s × slots).
import { StimulusSpec, type MaskCheckInput } from '@earmark/contracts';
import { MaskRevision, Target, TestCase, testCaseSettings } from '@earmark/db';
import { judgeAudio, judgeRequestFor, isJudgement } from '@earmark/domain';
import { decodeCapture, encodeWav, generateStimulus, stimulusAsPlayed } from '@earmark/dsp';
import { delay } from '@earmark/dsp/testing';
import { availableParallelism, loadavg } from 'node:os';
import { createBenchDatabase } from '../support/bench-database.js';
import { startStack } from '../support/stack.js';

const FS = 48000;
const CAPTURES = Number(process.env.EARMARK_BENCH_CAPTURES ?? 40);
const ENGINE_ROUNDS = 15;
/** 5 s sweep and 0.46 s of silence as float32 mono: 262,080 samples, a 1.0 MB WAV. */
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 5, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.46, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const checks: MaskCheckInput[] = [
  { id: 'response', kind: 'magnitude-envelope', label: 'Flat ±1 dB', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 100, db: -1 }, { hz: 16000, db: -1 }] },
  { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -16, max: -10 },
  { id: 'clipping', kind: 'integrity', metric: 'clipped-samples', max: 0 },
];
const wav = Buffer.from(encodeWav([delay(Float64Array.from(generateStimulus(spec).channels[0]!, Math.fround), 37)], FS, { encoding: 'float', bitsPerSample: 32 }));

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;

function engineAlone(): { cachedMs: number; rebuiltMs: number } {
  const request = judgeRequestFor(
    { format: { container: 'wav' }, sampleRate: FS, channelCount: 1, testCase: { key: 'bench', stimulus: spec, analysis: {}, channelMap: [] }, target: { key: 'board' } } as never,
    { checks, settings: { stimulus: spec, analysis: {}, channelMap: [] } } as never,
  );
  if (isJudgement(request)) throw new Error(request.reason ?? 'no request');
  const reference = stimulusAsPlayed(spec);
  const time = (rebuild: boolean) => {
    const started = performance.now();
    const judgement = judgeAudio(decodeCapture(wav, request.format), rebuild ? stimulusAsPlayed(spec) : reference, request);
    if (judgement.outcome !== 'pass') throw new Error(`the bench capture should pass: ${judgement.reason}`);
    return performance.now() - started;
  };
  for (let i = 0; i < 3; i++) time(false);
  const cached: number[] = [];
  const rebuilt: number[] = [];
  for (let i = 0; i < ENGINE_ROUNDS; i++) {
    cached.push(time(false));
    rebuilt.push(time(true));
  }
  return { cachedMs: median(cached), rebuiltMs: median(rebuilt) };
}

/** Engine alone, timed again right before each worker run: on a shared machine the load moves. */
function timeEngine() {
  const engine = engineAlone();
  console.log(`engine alone, one core, 1.0 MB capture: ${engine.cachedMs.toFixed(1)} ms (${(1000 / engine.cachedMs).toFixed(2)} captures/s) with the stimulus built once; ${engine.rebuiltMs.toFixed(1)} ms rebuilding it per capture (median of ${ENGINE_ROUNDS})`);
  return engine;
}

const database = await createBenchDatabase('earmark_worker_bench');
const stack = await startStack({ database });
try {
  const em = stack.orm.em.fork();
  const project = stack.fixture.project;
  em.create(Target, { project: project.id, key: 'board', name: 'Board', sampleRate: FS });
  const testCase = em.create(TestCase, { project: project.id, key: 'bench.sweep', name: 'Bench sweep', stimulus: spec });
  em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks, settings: testCaseSettings(testCase), author: stack.fixture.users.engineer.id, reviewer: stack.fixture.users.qa_manager.id });
  await em.flush();

  const rows: string[] = [];
  for (const slots of [1, 2]) {
    // The queue first, with no worker: every capture waits, so the worker starts saturated.
    for (let i = 0; i < CAPTURES; i++) {
      const sha = `be${slots}${i.toString(16).padStart(5, '0')}`;
      const res = await fetch(`${stack.url}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=bench.sweep&target=board`, { method: 'POST', body: wav, headers: { authorization: `Bearer ${stack.ciToken}`, 'content-type': 'audio/wav' } });
      if (res.status !== 202) throw new Error(`upload ${sha}: ${res.status} ${await res.text()}`);
    }
    const engine = timeEngine();
    const enginePerSecond = 1000 / engine.cachedMs;
    const load = loadavg()[0]!;
    const worker = await stack.startWorker({ EARMARK_ANALYSIS_SLOTS: String(slots), EARMARK_ANALYSIS_EXPIRE_S: '300', EARMARK_SWEEP_INTERVAL_S: '30' });
    const sql = `select extract(epoch from v.created_at) * 1000 as at, v.outcome from verdict v join capture c on c.id = v.capture_id join build b on b.id = c.build_id where b.sha like 'be${slots}%' order by v.created_at`;
    let verdicts: { at: string; outcome: string }[] = [];
    const deadline = Date.now() + 600_000;
    while (verdicts.length < CAPTURES && Date.now() < deadline) {
      await new Promise((resolve) => setTimeout(resolve, 250));
      verdicts = await stack.orm.em.fork().getConnection().execute(sql);
    }
    await worker.stop();
    // Where a job's time goes, from the worker's own log: the thread's share of "judge + record".
    const judged = worker.output.join('').split('\n').filter((l) => l.includes('"capture judged"')).map((l) => JSON.parse(l) as { ms: number; threadMs: number });
    console.log(`  per job (median): judge + record ${median(judged.map((j) => j.ms))} ms, of it in the thread ${median(judged.map((j) => j.threadMs))} ms`);
    if (verdicts.length < CAPTURES) throw new Error(`only ${verdicts.length} of ${CAPTURES} verdicts with ${slots} slot(s)`);
    const notPass = verdicts.filter((v) => v.outcome !== 'pass').length;
    const times = verdicts.map((v) => Number(v.at));
    const first = times[slots - 1]!;
    const perSecond = ((CAPTURES - slots) * 1000) / (times[CAPTURES - 1]! - first);
    const efficiency = perSecond / (enginePerSecond * slots);
    rows.push(`| ${slots} | ${engine.cachedMs.toFixed(1)} | ${engine.rebuiltMs.toFixed(1)} | ${perSecond.toFixed(2)} | ${(enginePerSecond * slots).toFixed(2)} | ${efficiency.toFixed(2)} | ${notPass} | ${load.toFixed(1)} |`);
    console.log(`${slots} slot(s): ${perSecond.toFixed(2)} verdicts/s, efficiency ${efficiency.toFixed(2)}`);
  }
  console.log(`\nRun ${new Date().toISOString()}, Node ${process.version}, ${availableParallelism()} cores, ${CAPTURES} captures of 1.0 MB per run.\n`);
  console.log('| slots | engine alone, stimulus cached (ms) | engine alone, stimulus rebuilt (ms) | verdicts/s at saturation | engine alone × slots (captures/s) | efficiency | verdicts not pass | load average before |');
  console.log('|---|---|---|---|---|---|---|---|');
  for (const row of rows) console.log(row);
} finally {
  await stack.close();
}
