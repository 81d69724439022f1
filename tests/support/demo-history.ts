import fs from 'node:fs';
import { seedDemoBuilds, type DemoSeedSummary } from '@earmark/infra/demo-builds';
import { inject } from 'vitest';
import { createTestDatabase } from '@earmark/db/testing';
import { readSnapshot, saveSnapshot, snapshotPlace, withSnapshotLock, type SnapshotPlace } from './demo-snapshot.js';
import { startStack, type Stack } from './stack.js';

export interface DemoSeedFigures extends DemoSeedSummary {
  /**
   * CPU time the seeding took: this process (the seeder and the in-process API) and the worker
   * process (its analysis threads included). On a busy machine the wall time says little; their
   * sum over the cores is what an idle 2-core machine would need at least.
   */
  cpuSeconds: { seederAndApi: number; worker: number };
  /**
   * Whether this stack is a clone of the run's snapshot. The figures are then those of the
   * run's one real seeding (another file's), and `cloneSeconds` what the clone took instead.
   */
  cloned: boolean;
  cloneSeconds?: number;
}

export type DemoStack = Stack & { demoSeed: DemoSeedFigures };

interface SnapshotMeta {
  ciToken: string;
  seed: DemoSeedFigures;
}

// As npm start runs it: two analysis slots, and no 4 s job expiry (that is for crash tests;
// on 2 busy cores a sweep's analysis may take longer).
const WORKER_ENV = { EARMARK_ANALYSIS_SLOTS: '2', EARMARK_ANALYSIS_EXPIRE_S: '120' };

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
 *
 * The first file of a run to ask seeds it for real and saves a snapshot (demo-snapshot.ts);
 * later files get a clone of it (database, objects, CI token; their own API and worker), the
 * same rows a seeding would make, minutes old at most: the demo's dates stay relative to now.
 */
export async function startDemoHistory(log: (line: string) => void = () => {}): Promise<DemoStack> {
  const runId = inject('demoSnapshotRun');
  if (!runId) return seedDemoHistory(log);
  const place = snapshotPlace(inject('pgAdminUrl'), runId);
  return withSnapshotLock(place, async () => {
    const meta = await readSnapshot<SnapshotMeta>(place);
    if (meta) return cloneDemoHistory(place, meta, log);
    const stack = await seedDemoHistory(log);
    await saveDemoSnapshot(stack, place, log);
    return stack;
  });
}

async function seedDemoHistory(log: (line: string) => void): Promise<DemoStack> {
  const stack = await startStack({ seed: 'demo' });
  const worker = await stack.startWorker(WORKER_ENV);
  const cpuBefore = process.cpuUsage();
  const workerBefore = processCpuSeconds(worker.child.pid);
  const summary = await seedDemoBuilds(stack.url, stack.ciToken, log);
  if (!summary) throw new Error('the demo history was already there: a fresh test database should have none');
  const cpu = process.cpuUsage(cpuBefore);
  const cpuSeconds = { seederAndApi: (cpu.user + cpu.system) / 1e6, worker: processCpuSeconds(worker.child.pid) - workerBefore };
  return Object.assign(stack, { demoSeed: { ...summary, cpuSeconds, cloned: false } });
}

const ACTIVE_JOBS_WITHIN_MS = 60_000;

/**
 * Saves the snapshot once no job is in the worker's hands: a clone has no such worker, so a job
 * dumped as active would wait out its expiry there. If that does not happen, or the dump fails,
 * there is no snapshot and the next file seeds for itself (slower, never different).
 */
async function saveDemoSnapshot(stack: DemoStack, place: SnapshotPlace, log: (line: string) => void): Promise<void> {
  const started = performance.now();
  const conn = stack.orm.em.getConnection();
  for (const deadline = Date.now() + ACTIVE_JOBS_WITHIN_MS; ; ) {
    const [row] = await conn.execute<{ active: number }[]>(`select count(*)::int as active from pgboss.job where state = 'active'`);
    if (row!.active === 0) break;
    if (Date.now() > deadline) {
      console.warn(`demo snapshot not saved: ${row!.active} jobs still active after ${ACTIVE_JOBS_WITHIN_MS / 1000} s`);
      return;
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  try {
    const meta: SnapshotMeta = { ciToken: stack.ciToken, seed: stack.demoSeed };
    await saveSnapshot(place, { databaseUrl: stack.workerEnv.EARMARK_DATABASE_URL!, objectsDir: stack.objectsDir }, meta);
    log(`Saved the demo history as this run's snapshot in ${((performance.now() - started) / 1000).toFixed(1)} s.`);
  } catch (error) {
    console.warn(`demo snapshot not saved (the next file seeds again): ${String(error)}`);
  }
}

async function cloneDemoHistory(place: SnapshotPlace, meta: SnapshotMeta, log: (line: string) => void): Promise<DemoStack> {
  const started = performance.now();
  const database = await createTestDatabase(place.database);
  const stack = await startStack({ seed: 'none', database, objectsFrom: `${place.dir}/objects` });
  stack.ciToken = meta.ciToken;
  await stack.startWorker(WORKER_ENV);
  const cloneSeconds = (performance.now() - started) / 1000;
  log(`Cloned the demo history from this run's snapshot in ${cloneSeconds.toFixed(1)} s.`);
  return Object.assign(stack, { demoSeed: { ...meta.seed, cloned: true, cloneSeconds } });
}
