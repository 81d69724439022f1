import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Build, Capture, CheckResult, Finding, MaskRevision, Target, TestCase, Verdict, testCaseSettings } from '@earmark/db';
import { useSeededDatabase } from '@earmark/db/testing';
import { startS3Fake, type S3Fake } from '@earmark/infra/fakes';
import { QUEUES, type BuildStatus } from '@earmark/contracts';
import { ObjectMissingError, ObjectStore, RETENTION_CRON, scheduleMaintenance, startBoss } from '@earmark/platform';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { applyRetentionJob } from '../src/jobs/apply-retention.job.js';
import { analyzeCapture, type AnalyzeDeps } from '../src/jobs/analyze-capture.job.js';

const seeded = useSeededDatabase(4);
const logger = pino({ level: 'silent' });
const DAY = 24 * 3600 * 1000;
const env = { EARMARK_RETENTION_PASSED_DAYS: 90, EARMARK_RETENTION_FAILED_DAYS: 365, EARMARK_ORPHAN_GRACE_HOURS: 24 };
let s3: S3Fake;
let s3Dir: string;
let objectStore: ObjectStore;

beforeAll(async () => {
  s3Dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-retention-s3-'));
  s3 = await startS3Fake({ port: 0, directory: s3Dir, bucket: 'earmark-captures' });
  objectStore = new ObjectStore({ endpoint: s3.endpoint, bucket: 'earmark-captures', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' });
  await objectStore.ensureBucket();
});
afterAll(async () => {
  objectStore?.destroy();
  await s3?.close();
  fs.rmSync(s3Dir, { recursive: true, force: true });
});

const run = (overrides: Partial<typeof env> = {}, options: { now?: Date; batchSize?: number } = {}) =>
  applyRetentionJob(null, { orm: seeded.orm, objectStore, logger, env: { ...env, ...overrides }, options });

let seq = 0;
/** A test case and target of their own, so "the last passing capture" of one scenario is not another's. */
async function slot(): Promise<{ testCase: string; target: string }> {
  const em = seeded.orm.em.fork();
  seq += 1;
  const testCase = em.create(TestCase, { project: seeded.fixture.project.id, key: `ret.case${seq}`, name: 'retention', stimulus: { kind: 'silence', sampleRate: 48000, seconds: 1 } });
  const target = em.create(Target, { project: seeded.fixture.project.id, key: `ret-target-${seq}`, name: 'retention' });
  await em.flush();
  return { testCase: testCase.id, target: target.id };
}

interface Made {
  id: string;
  objectKey: string;
  plotKey: string;
}

/**
 * A judged capture in a build `ageDays` old, with its audio and one stored plot in the object
 * store and one check result (measured −1.25 dB), as ingest and the worker leave them.
 */
async function judged(where: { testCase: string; target: string }, ageDays: number, build: BuildStatus, outcome: 'pass' | 'fail' | 'error', waiverBasis = ''): Promise<Made> {
  const em = seeded.orm.em.fork();
  seq += 1;
  const sha = `7e7${seq.toString(16).padStart(5, '0')}`;
  const createdAt = new Date(Date.now() - ageDays * DAY);
  const b = em.create(Build, { project: seeded.fixture.project.id, sha, status: build, createdAt });
  const id = randomUUID();
  const objectKey = `captures/${seeded.fixture.project.key}/${sha}/${id}.wav`;
  const capture = em.create(Capture, {
    id, project: seeded.fixture.project.id, build: b, testCase: where.testCase, target: where.target, objectKey, sha256: '0'.repeat(64),
    sizeBytes: 44, format: { container: 'wav' }, sampleRate: 48000, channelCount: 1, frames: 0, status: outcome === 'error' ? 'error' : 'done', createdAt,
  });
  const verdict = em.create(Verdict, { capture, outcome, reason: outcome, engineVersion: '1.0.0', waiverBasis, createdAt });
  em.create(CheckResult, { verdict, checkId: 'level', kind: 'level', pass: outcome !== 'fail', measured: -1.25, limit: -1, margin: 0.25 });
  await em.flush();
  const plotKey = `plot-cache/${id}/1.0.0-none-512-0.json`;
  await objectStore.put(objectKey, Buffer.from('RIFF....WAVE'), 'audio/wav');
  await objectStore.put(plotKey, Buffer.from('{"plot":{}}'), 'application/json');
  return { id, objectKey, plotKey };
}

async function exists(key: string): Promise<boolean> {
  return objectStore.get(key).then(
    () => true,
    (error: unknown) => {
      if (error instanceof ObjectMissingError) return false;
      throw error;
    },
  );
}

async function row(id: string) {
  const em = seeded.orm.em.fork();
  const capture = await em.findOneOrFail(Capture, { id });
  const verdict = await em.findOneOrFail(Verdict, { capture: id });
  const check = await em.findOneOrFail(CheckResult, { verdict });
  return { purgedAt: capture.purgedAt, outcome: verdict.outcome, measured: check.measured, margin: check.margin };
}

describe('the retention policy', () => {
  it("purges a passing build's capture past EARMARK_RETENTION_PASSED_DAYS: audio and plots gone, verdict and numbers kept", async () => {
    const where = await slot();
    const old = await judged(where, 100, 'pass', 'pass');
    const newer = await judged(where, 10, 'pass', 'pass');
    const before = Date.now();

    const { retention } = await run();

    expect(retention.purged).toBeGreaterThanOrEqual(1);
    const purged = await row(old.id);
    expect(purged.purgedAt!.getTime()).toBeGreaterThanOrEqual(before - 1000);
    expect(purged).toMatchObject({ outcome: 'pass', measured: -1.25, margin: 0.25 });
    expect(await exists(old.objectKey)).toBe(false);
    expect(await exists(old.plotKey)).toBe(false);
    // 10 days old: within the limit.
    expect((await row(newer.id)).purgedAt).toBeNull();
    expect(await exists(newer.objectKey)).toBe(true);
    expect(await exists(newer.plotKey)).toBe(true);
  });

  it('ages a capture by the later of its build and itself: one uploaded today into a build 100 days old (a CI re-run) is kept', async () => {
    const where = await slot();
    const old = await judged(where, 100, 'pass', 'pass');
    await judged(where, 5, 'pass', 'pass'); // a later pass, so `old` is not the last passing capture
    await seeded.orm.em.fork().nativeUpdate(Capture, { id: old.id }, { createdAt: new Date() });
    await run();
    expect((await row(old.id)).purgedAt).toBeNull();
    expect(await exists(old.objectKey)).toBe(true);
  });

  it("keeps a failing build's capture until EARMARK_RETENTION_FAILED_DAYS, and a waived pass counts as failing", async () => {
    const where = await slot();
    const failing100 = await judged(where, 100, 'fail', 'fail');
    const failing400 = await judged(where, 400, 'fail', 'fail');
    const erroring400 = await judged(where, 400, 'error', 'error');
    const waivedSlot = await slot();
    const waived100 = await judged(waivedSlot, 100, 'pass', 'pass', 'w-1');
    // A newer pass of the waived one's case, so it is not kept as the last passing capture instead.
    await judged(waivedSlot, 10, 'pass', 'pass');
    await run();

    expect((await row(failing100.id)).purgedAt).toBeNull();
    expect(await exists(failing100.objectKey)).toBe(true);
    expect((await row(waived100.id)).purgedAt).toBeNull();
    expect(await exists(waived100.objectKey)).toBe(true);
    for (const gone of [failing400, erroring400]) {
      expect((await row(gone.id)).purgedAt).not.toBeNull();
      expect(await exists(gone.objectKey)).toBe(false);
    }
    expect(await row(failing400.id)).toMatchObject({ outcome: 'fail', measured: -1.25 });
  });

  it('keeps golden captures, captures under review and the last passing capture however old', async () => {
    const where = await slot();
    const golden = await judged(where, 1000, 'fail', 'fail');
    const underReview = await judged(where, 1000, 'fail', 'fail');
    const lastPass = await judged(await slot(), 1000, 'pass', 'pass');
    const em = seeded.orm.em.fork();
    const testCase = await em.findOneOrFail(TestCase, { id: where.testCase });
    em.create(MaskRevision, {
      testCase, revision: 1, state: 'draft', settings: testCaseSettings(testCase), author: seeded.fixture.users.engineer.id,
      derivation: { captureIds: [golden.id, randomUUID()], k: 3 },
    });
    em.create(Finding, { project: seeded.fixture.project.id, capture: underReview.id, checkId: 'level', title: 'level too low', state: 'investigating' });
    await em.flush();

    await run();

    for (const kept of [golden, underReview, lastPass]) {
      expect((await row(kept.id)).purgedAt).toBeNull();
      expect(await exists(kept.objectKey)).toBe(true);
    }
  });

  it('does nothing the second time, and nothing at all with both limits at 0', async () => {
    const where = await slot();
    const old = await judged(where, 500, 'fail', 'fail');
    await run();
    const first = (await row(old.id)).purgedAt;
    expect(first).not.toBeNull();

    const again = await run();
    expect(again.retention).toEqual({ purged: 0, plotsDeleted: 0, failed: 0 });
    expect((await row(old.id)).purgedAt).toEqual(first);

    const older = await judged(where, 5000, 'fail', 'fail');
    const off = await run({ EARMARK_RETENTION_PASSED_DAYS: 0, EARMARK_RETENTION_FAILED_DAYS: 0 });
    expect(off.retention.purged).toBe(0);
    expect(await exists(older.objectKey)).toBe(true);
    await run();
    expect(await exists(older.objectKey)).toBe(false);
  });

  it('purges each capture once when several workers run it at the same time', async () => {
    const where = await slot();
    const made = await Promise.all(Array.from({ length: 9 }, () => judged(where, 800, 'fail', 'fail')));

    const results = await Promise.all([run({}, { batchSize: 2 }), run({}, { batchSize: 2 }), run({}, { batchSize: 2 })]);

    expect(results.reduce((n, r) => n + r.retention.purged, 0)).toBe(9);
    expect(results.reduce((n, r) => n + r.retention.plotsDeleted, 0)).toBe(9);
    for (const m of made) expect(await exists(m.objectKey)).toBe(false);
  });
});

describe('after the purge', () => {
  it('a re-analysis queued before it leaves the verdicts as they are instead of judging missing audio', async () => {
    const old = await judged(await slot(), 600, 'fail', 'fail');
    await run();
    expect((await row(old.id)).purgedAt).not.toBeNull();
    const untouchable = () => {
      throw new Error('the purged audio must not be read');
    };
    const deps = {
      orm: seeded.orm, objectStore: { get: untouchable, getStream: untouchable }, logger, maxAttempts: 4, delayMs: 0,
      jobs: { analyzeCapture: untouchable, evaluateImpact: untouchable, sendMail: untouchable }, links: {}, analysis: { pool: { run: untouchable } },
    } as unknown as AnalyzeDeps;
    const job = { id: 'j', name: 'analyze-capture', data: { captureId: old.id }, retryCount: 3 } as unknown as Parameters<typeof analyzeCapture>[0];

    await analyzeCapture(job, deps);

    expect(await seeded.orm.em.fork().count(Verdict, { capture: old.id })).toBe(1);
    expect(await row(old.id)).toMatchObject({ outcome: 'fail', measured: -1.25 });
  });
});

describe('orphaned objects', () => {
  it('deletes capture audio no row holds once past the grace period, keeps fresh ones and those with a row', async () => {
    const orphanKey = `captures/${seeded.fixture.project.key}/dead00/${randomUUID()}.wav`;
    await objectStore.put(orphanKey, Buffer.from('RIFF'), 'audio/wav');
    const held = await judged(await slot(), 1, 'pass', 'pass');

    // Just written: within the 24 h grace (an upload may be between its object and its row).
    const fresh = await run();
    expect(await exists(orphanKey)).toBe(true);
    expect(fresh.orphans.captureObjectsDeleted).toBe(0);

    const later = await run({}, { now: new Date(Date.now() + 25 * 3600 * 1000) });
    expect(later.orphans.captureObjectsDeleted).toBe(1);
    expect(await exists(orphanKey)).toBe(false);
    expect(await exists(held.objectKey)).toBe(true);
    expect(await exists(held.plotKey)).toBe(true);
  });

  it('deletes plots of captures that no longer exist', async () => {
    const gone = await judged(await slot(), 1, 'fail', 'fail');
    const kept = await judged(await slot(), 1, 'fail', 'fail');
    await seeded.orm.em.fork().nativeDelete(Capture, { id: gone.id });

    const { orphans } = await run({}, { now: new Date(Date.now() + 25 * 3600 * 1000) });

    expect(await exists(gone.plotKey)).toBe(false);
    expect(await exists(kept.plotKey)).toBe(true);
    // The deleted capture's audio has no row either.
    expect(await exists(gone.objectKey)).toBe(false);
    expect(orphans).toMatchObject({ plotObjectsDeleted: 1, captureObjectsDeleted: 1 });
  });

  it('lists every page of a prefix with each object’s time and size', async () => {
    const prefix = `paging-${randomUUID()}/`;
    for (let i = 0; i < 5; i++) await objectStore.put(`${prefix}${i}`, Buffer.alloc(10 + i), 'application/octet-stream');
    const pages = [];
    for await (const page of objectStore.listPages(prefix, 2)) pages.push(page);

    expect(pages.map((p) => p.length)).toEqual([2, 2, 1]);
    expect(pages.flat().map((o) => [o.key.slice(prefix.length), o.sizeBytes])).toEqual([['0', 10], ['1', 11], ['2', 12], ['3', 13], ['4', 14]]);
    for (const o of pages.flat()) expect(Math.abs(o.lastModified.getTime() - Date.now())).toBeLessThan(60_000);
    expect(await objectStore.list(prefix)).toHaveLength(5);
  });
});

describe('the schedule', () => {
  it('runs apply-retention hourly, one run at a time, however many workers schedule it', async () => {
    const bosses = await Promise.all([startBoss(seeded.db.url, logger), startBoss(seeded.db.url, logger)]);
    try {
      await Promise.all(bosses.map((boss) => scheduleMaintenance(boss)));
      const schedules = await bosses[0]!.getSchedules();
      expect(schedules.filter((s) => s.name === QUEUES.applyRetention).map((s) => s.cron)).toEqual([RETENTION_CRON]);
      expect(RETENTION_CRON).toMatch(/^\d+ \* \* \* \*$/);
      expect(await bosses[0]!.getQueue(QUEUES.applyRetention)).toMatchObject({ policy: 'singleton' });
    } finally {
      await Promise.all(bosses.map((b) => b.stop({ graceful: false, wait: true })));
    }
  });
});
