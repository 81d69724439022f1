// Earmark engine benchmark: `node --import tsx packages/dsp/bench/run.ts`
// (a) forward real FFT: engine vs fft.js vs ndarray-fft vs numpy.fft.rfft (Python subprocess
//     timing itself on the same input); (b) full analyze of a 10 s 48 kHz stereo capture vs a
//     numpy/scipy script computing the same measures; (c) peak RSS of the analyze.
// Medians of repeated rounds, side by side in one run. Prints markdown for docs/performance.md.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { analyzeCapture, createRealFftPlan } from '../src/index.js';
import { makeCapture } from './capture.js';
import { SWEEP_BENCH_CHANNELS, SWEEP_BENCH_RATE } from './sweep-capture.js';

const here = dirname(fileURLToPath(import.meta.url));
const require = createRequire(import.meta.url);
// Untyped CommonJS packages, loaded for comparison only.
const FFTJS = require('fft.js') as new (n: number) => { createComplexArray(): number[]; realTransform(out: number[], data: Float64Array): void };
const ndarray = require('ndarray') as (data: Float64Array) => unknown;
const ndfft = require('ndarray-fft') as (dir: number, re: unknown, im: unknown) => void;

const ROUNDS = 7;
const tmp = mkdtempSync(join(tmpdir(), 'earmark-bench-'));
process.on('exit', () => rmSync(tmp, { recursive: true, force: true }));

const median = (v: number[]): number => {
  const s = [...v].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? (s[m] as number) : ((s[m - 1] as number) + (s[m] as number)) / 2;
};

/** Median seconds per call over ROUNDS rounds of `reps` calls, after a warm-up round. */
function time(reps: number, fn: () => void): number {
  for (let i = 0; i < reps; i++) fn();
  const rounds: number[] = [];
  for (let r = 0; r < ROUNDS; r++) {
    const t = process.hrtime.bigint();
    for (let i = 0; i < reps; i++) fn();
    rounds.push(Number(process.hrtime.bigint() - t) / 1e9 / reps);
  }
  return median(rounds);
}

function python(args: string[]): { seconds: number[]; [k: string]: unknown } | null {
  const run = spawnSync('python3', args, { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  if (run.status !== 0) {
    process.stderr.write(`python3 ${args[0]} failed: ${run.stderr || run.error?.message}\n`);
    return null;
  }
  return JSON.parse(run.stdout) as { seconds: number[] };
}

const ms = (s: number | null): string => (s === null ? 'n/a' : (s * 1e3).toFixed(s < 1e-3 ? 4 : 2));
const ratio = (a: number | null, b: number | null): string => (a === null || b === null ? 'n/a' : `${(a / b).toFixed(2)}×`);

// (a) real FFT
const out: string[] = [];
out.push(`Run ${new Date().toISOString()}, Node ${process.version}, ${ROUNDS} rounds, median per call.`);
out.push('');
out.push('### (a) Forward real FFT (float64)');
out.push('');
out.push('| N | engine (ms) | fft.js realTransform (ms) | ndarray-fft (ms) | numpy.fft.rfft (ms) | engine / numpy | fft.js / numpy | ndarray-fft / numpy |');
out.push('|---|---|---|---|---|---|---|---|');
let seed = 1;
const rand = (): number => {
  seed = (seed * 16807) % 2147483647;
  return seed / 2147483647 - 0.5;
};
for (const n of [4096, 65536, 524288]) {
  const x = Float64Array.from({ length: n }, rand);
  const reps = Math.max(3, Math.round(2 ** 22 / n));
  const plan = createRealFftPlan(n);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  const engine = time(reps, () => plan.forward(x, re, im));
  const f = new FFTJS(n);
  const fo = f.createComplexArray();
  const fftjs = time(reps, () => f.realTransform(fo, x));
  // ndarray-fft transforms in place: the copy of the input is part of each call.
  const nre = new Float64Array(n);
  const nim = new Float64Array(n);
  const are = ndarray(nre);
  const aim = ndarray(nim);
  const nd = time(Math.max(1, reps >> 2), () => {
    nre.set(x);
    nim.fill(0);
    ndfft(1, are, aim);
  });
  const file = join(tmp, `fft-${n}.f64`);
  writeFileSync(file, new Uint8Array(x.buffer));
  const np = python([join(here, 'numpy_fft.py'), file, String(ROUNDS), String(reps)]);
  const numpy = np ? median(np.seconds) : null;
  out.push(`| ${n} | ${ms(engine)} | ${ms(fftjs)} | ${ms(nd)} | ${ms(numpy)} | ${ratio(engine, numpy)} | ${ratio(fftjs, numpy)} | ${ratio(nd, numpy)} |`);
}

// (b) full analyze
const capture = makeCapture();
const analyzeRounds = 5;
analyzeCapture(capture);
const engineRounds: number[] = [];
let report = analyzeCapture(capture);
for (let r = 0; r < analyzeRounds; r++) {
  const t = process.hrtime.bigint();
  report = analyzeCapture(capture);
  engineRounds.push(Number(process.hrtime.bigint() - t) / 1e9);
}
const engineAnalyze = median(engineRounds);
const capFile = join(tmp, 'capture.f64');
const joined = new Float64Array(capture.channels.length * (capture.channels[0]?.length ?? 0));
capture.channels.forEach((c, i) => joined.set(c, i * c.length));
writeFileSync(capFile, new Uint8Array(joined.buffer));
const sp = python([join(here, 'scipy_analyze.py'), capFile, String(capture.channels.length), String(capture.sampleRate), String(analyzeRounds)]);
const scipyAnalyze = sp ? median(sp.seconds) : null;
out.push('');
out.push('### (b) Full analyze, 10 s 48 kHz stereo capture');
out.push('');
out.push('| engine analyzeCapture (ms) | numpy/scipy script (ms) | engine / scipy |');
out.push('|---|---|---|');
out.push(`| ${ms(engineAnalyze)} | ${ms(scipyAnalyze)} | ${ratio(engineAnalyze, scipyAnalyze)} |`);
const c0 = report.channels[0];
const first = (sp?.first ?? {}) as Record<string, number>;
out.push('');
out.push('Agreement on channel 0 (engine vs script):');
out.push('');
out.push('| measure | engine | numpy/scipy |');
out.push('|---|---|---|');
for (const [name, mine, theirs] of [
  ['fundamental (Hz)', c0?.fundamentalHz, first.fundamentalHz],
  ['THD (%)', c0?.thdPercent, first.thdPercent],
  ['THD+N (dB)', c0?.thdnDb, first.thdnDb],
  ['SNR (dB)', c0?.snrDb, first.snrDb],
  ['noise floor (dBFS)', c0?.noiseFloorDbfs, first.noiseFloorDbfs],
  ['noise floor A (dBFS)', c0?.noiseFloorDbfsA, first.noiseFloorDbfsA],
] as const) {
  out.push(`| ${name} | ${typeof mine === 'number' ? mine.toPrecision(8) : 'n/a'} | ${typeof theirs === 'number' ? theirs.toPrecision(8) : 'n/a'} |`);
}

// (c) peak RSS in a fresh process
function rss(mode: string): { startKiB: number; inputKiB: number; peakKiB: number; seconds?: number } | null {
  const run = spawnSync(process.execPath, ['--import', 'tsx', join(here, 'analyze-rss.ts'), mode], { encoding: 'utf8', cwd: here });
  if (run.status !== 0) {
    process.stderr.write(`analyze-rss failed: ${run.stderr}\n`);
    return null;
  }
  return JSON.parse(run.stdout) as { startKiB: number; inputKiB: number; peakKiB: number; seconds?: number };
}
const base = rss('baseline');
const full = rss('analyze');
const mib = (k: number | undefined): string => (k === undefined ? 'n/a' : (k / 1024).toFixed(1));
out.push('');
out.push('### (c) Peak resident memory of one analyze (fresh process)');
out.push('');
out.push('| process start (MiB) | after building the 2 × 480000-sample input (MiB) | peak after analyze (MiB) |');
out.push('|---|---|---|');
out.push(`| ${mib(base?.startKiB)} | ${mib(base?.inputKiB)} | ${mib(full?.peakKiB)} |`);

// (d) the large case: 10 s, 192 kHz, 8 channels, against a sweep reference (deconvolution,
// harmonic responses, distortion versus frequency), each run in a fresh process so the peak RSS
// is this analysis's own. Targets: ≤ 5 s on one core, ≤ 512 MiB.
const big = [rss('sweep8'), rss('sweep8'), rss('sweep8')].filter((r): r is NonNullable<typeof r> => r !== null);
const bigSeconds = big.length ? median(big.map((r) => r.seconds ?? NaN)) : null;
const bigPeak = big.length ? Math.max(...big.map((r) => r.peakKiB)) : undefined;
const bigInput = big[0]?.inputKiB;
out.push('');
out.push(`### (d) ${SWEEP_BENCH_CHANNELS}-channel ${SWEEP_BENCH_RATE / 1000} kHz 10 s capture with a sweep reference (fresh process, median of 3)`);
out.push('');
out.push('| analyzeCapture (s) | target (s) | after building input and reference (MiB) | peak (MiB) | target (MiB) |');
out.push('|---|---|---|---|---|');
out.push(`| ${bigSeconds === null ? 'n/a' : bigSeconds.toFixed(2)} | 5 | ${mib(bigInput)} | ${mib(bigPeak)} | 512 |`);
process.stdout.write(`${out.join('\n')}\n`);
