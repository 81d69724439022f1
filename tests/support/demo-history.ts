import fs from 'node:fs';
import { seedDemoBuilds, type DemoSeedSummary } from '@earmark/infra/demo-builds';
import { startStack, type Stack } from './stack.js';

export interface DemoSeedFigures extends DemoSeedSummary {
  /**
   * CPU time the seeding took: this process (the seeder and the in-process API) and the worker
   * process (its analysis threads included). On a busy machine the wall time says little; their
   * sum over the cores is what an idle 2-core machine would need at least.
   */
  cpuSeconds: { seederAndApi: number; worker: number };
}

/** user + system CPU seconds of a process so far, from /proc (Linux; clock ticks of 1/100 s). */
function processCpuSeconds(pid: number | undefined): number {
  if (pid === undefined) return Number.NaN;
  const fields = fs.readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ');
  return (Number(fields[11]) + Number(fields[12])) / 100;
}

/**
 * The demo (Fernwick) with its six-week history sent through the real pipeline, every capture
 * judged and the people's part played (waiver, revision in review with its impact), as
 * `npm start` seeds it. `demoSeed` says how long the seeding took.
 */
export async function startDemoHistory(log: (line: string) => void = () => {}): Promise<Stack & { demoSeed: DemoSeedFigures }> {
  const stack = await startStack({ seed: 'demo' });
  // As npm start runs it: two analysis slots, and no 4 s job expiry (that is for crash tests;
  // on 2 busy cores a sweep's analysis may take longer).
  const worker = await stack.startWorker({ EARMARK_ANALYSIS_SLOTS: '2', EARMARK_ANALYSIS_EXPIRE_S: '120' });
  const cpuBefore = process.cpuUsage();
  const workerBefore = processCpuSeconds(worker.child.pid);
  const summary = await seedDemoBuilds(stack.url, stack.ciToken, log);
  if (!summary) throw new Error('the demo history was already there: a fresh test database should have none');
  const cpu = process.cpuUsage(cpuBefore);
  const cpuSeconds = { seederAndApi: (cpu.user + cpu.system) / 1e6, worker: processCpuSeconds(worker.child.pid) - workerBefore };
  return Object.assign(stack, { demoSeed: { ...summary, cpuSeconds } });
}
