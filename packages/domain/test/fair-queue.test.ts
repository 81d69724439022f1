import { QUEUES } from '@earmark/contracts';
import { Build, Capture, Target, TestCase, initOrm, seedRoles, type RoleFixture } from '@earmark/db';
import { createTestDatabase, type TestDatabase } from '@earmark/db/testing';
import { startBoss } from '@earmark/platform';
import type { MikroORM } from '@mikro-orm/postgresql';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { REEVALUATION_PRIORITY, createJobProducer, freshCapturePriority, type JobProducer } from '../src/index.js';

/**
 * Fair analysis order across projects, with the real queue and no worker: jobs are queued
 * through the producer and fetched the way a worker fetches them (highest priority, then oldest).
 */
let db: TestDatabase;
let orm: MikroORM;
let boss: Awaited<ReturnType<typeof startBoss>>;
let jobs: JobProducer;
let fx: RoleFixture;

beforeAll(async () => {
  db = await createTestDatabase();
  orm = await initOrm({ url: db.url, poolMax: 3 });
  fx = await seedRoles(orm.em.fork());
  boss = await startBoss(db.url, pino({ level: 'silent' }));
  jobs = createJobProducer(boss);
});
afterAll(async () => {
  await boss?.stop({ graceful: false, wait: true });
  await orm?.close();
  await db?.drop();
});

/** `count` captures of a project, created one after another (status queued, as ingest leaves them). */
async function queuedCaptures(projectId: string, count: number): Promise<string[]> {
  const em = orm.em.fork();
  const suffix = Math.random().toString(36).slice(2, 8);
  const testCase = em.create(TestCase, { project: projectId, key: `tc.${suffix}`, name: 'case', stimulus: { kind: 'silence' } });
  const target = em.create(Target, { project: projectId, key: `t-${suffix}`, name: 'target' });
  const build = em.create(Build, { project: projectId, sha: `${suffix}0` });
  const base = Date.now();
  const captures = Array.from({ length: count }, (_, i) =>
    em.create(Capture, { project: projectId, build, testCase, target, objectKey: 'k', sha256: 'a'.repeat(64), sizeBytes: 1, sampleRate: 48000, channelCount: 1, frames: 1, createdAt: new Date(base + i) }),
  );
  await em.flush();
  return captures.map((c) => c.id);
}

const fetchIds = async (n: number): Promise<string[]> =>
  ((await boss.fetch<{ captureId: string }>(QUEUES.analyzeCapture, { batchSize: n })) ?? []).map((job) => job.data.captureId);

describe('fair analysis queue across projects', () => {
  it("puts another project's single capture ahead of one project's backlog of 200", async () => {
    const backlog = await queuedCaptures(fx.project.id, 200);
    for (const captureId of backlog) await jobs.analyzeCapture({ captureId });
    const [single] = await queuedCaptures(fx.otherProject.id, 1);
    await jobs.analyzeCapture({ captureId: single! });

    // Two analysis slots (the worker's default): B's capture is in the first fetch, beside A's first.
    expect((await fetchIds(2)).sort()).toEqual([backlog[0], single].sort());
    // A's backlog then runs in its own order.
    expect((await fetchIds(3)).sort()).toEqual(backlog.slice(1, 4).sort());
    expect(await fetchIds(1)).toEqual([backlog[4]]);
  });

  it("counts only the project's captures still waiting: analysed ones no longer push a new capture back", async () => {
    const [first, second] = await queuedCaptures(fx.project.id, 2);
    await orm.em.fork().nativeUpdate(Capture, { id: first }, { status: 'done' });
    const id = await jobs.analyzeCapture({ captureId: second! });
    const job = await boss.getJobById(QUEUES.analyzeCapture, id!);
    // A's backlog of 200 (fetched but not yet analysed, so still queued) waits ahead of it; the done one does not.
    expect(job?.priority).toBe(-200);
  });

  it('queues re-evaluation behind every fresh capture, and a sweeper re-queue gets its fair place again', async () => {
    const [capture] = await queuedCaptures(fx.otherProject.id, 1);
    await orm.em.fork().nativeUpdate(Capture, { id: capture }, { status: 'done' });
    const reeval = await jobs.analyzeCapture({ captureId: capture!, maskRevisionId: '00000000-0000-4000-8000-000000000001' });
    expect((await boss.getJobById(QUEUES.analyzeCapture, reeval!))?.priority).toBe(REEVALUATION_PRIORITY);
    // The sweeper re-queues an orphan through the same producer: behind B's one waiting capture only.
    const [orphan] = await queuedCaptures(fx.otherProject.id, 1);
    const requeued = await jobs.analyzeCapture({ captureId: orphan! });
    expect((await boss.getJobById(QUEUES.analyzeCapture, requeued!))?.priority).toBe(-1);
  });

  it('never ranks a fresh capture below re-evaluation, however long the backlog', () => {
    expect(freshCapturePriority(0)).toBe(0);
    expect(freshCapturePriority(5)).toBe(-5);
    expect(freshCapturePriority(5_000_000)).toBe(REEVALUATION_PRIORITY + 1);
  });
});
