import fs from 'node:fs';
import path from 'node:path';
import { repoRoot } from '../paths.js';
import { runInherited } from '../shell.js';

const BENCHES = {
  /** The engine: FFT, full analysis and memory against numpy/scipy. */
  dsp: { script: 'packages/dsp/bench/run.ts', cwd: 'packages/dsp' },
  /** The builds API over 100k captures. */
  api: { script: 'tests/bench/builds-api.bench.ts', cwd: 'tests' },
  /** API CPU per verdict wait answered (`?wait=30`) against once-a-second polls. */
  wait: { script: 'tests/bench/verdict-wait.bench.ts', cwd: 'tests' },
  /** /api/health latency while 16 sign-ins check passwords at once. */
  signin: { script: 'tests/bench/sign-in-health.bench.ts', cwd: 'tests' },
  /** API CPU per 1 MiB capture upload (auth, decode in a thread, store, rows, job). */
  ingest: { script: 'apps/api/bench/ingest-cpu.bench.ts', cwd: 'apps/api' },
  /** The capture page's spectrum draw time in Chromium. */
  plot: { script: 'tests/bench/capture-plot.bench.ts', cwd: 'tests' },
  /** The worker's analysis slots: verdicts/s with 1 and 2 slots against the engine alone. */
  worker: { script: 'tests/bench/analysis-slots.bench.ts', cwd: 'tests' },
  /** One analysis slot's job, step by step (object, thread, verdict, plot, pg-boss), for two capture shapes. */
  jobs: { script: 'tests/bench/job-overhead.bench.ts', cwd: 'tests' },
} as const;

/** `npm run bench [-- dsp|api|plot|worker|jobs]`: speed and memory targets, measured (docs/performance.md). */
export async function benchCommand(args: string[]): Promise<number> {
  const [which, ...rest] = args;
  const selected = which && which in BENCHES ? [which as keyof typeof BENCHES] : (Object.keys(BENCHES) as (keyof typeof BENCHES)[]);
  for (const name of selected) {
    const bench = BENCHES[name];
    const script = path.join(repoRoot, bench.script);
    if (!fs.existsSync(script)) {
      console.error(`earmark: no benchmark script at ${bench.script}`);
      return 2;
    }
    console.log(`\n== bench: ${name} ==`);
    const code = await runInherited(process.execPath, ['--import', 'tsx', script, ...(which === name ? rest : [])], { cwd: path.join(repoRoot, bench.cwd) });
    if (code !== 0) return code;
  }
  return 0;
}
