import { createHash, randomBytes } from 'node:crypto';
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { Capture, MaskRevision, Target, TestCase, TEST_PASSWORD, testCaseSettings } from '@earmark/db';
import { StimulusSpec, type CaptureDto, type MaskCheckInput } from '@earmark/contracts';
import { encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import { applyBiquad, delay, peakingEqCoefficients } from '@earmark/dsp/testing';
import { exportObjects, importObjects, ObjectMissingError } from '@earmark/platform';
import pg from 'pg';
import { afterAll, describe, expect, inject, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { waitFor } from '../support/wait-for.js';

/**
 * The backup and restore procedure of the operations guide, run for real: captures judged by
 * a real worker, `pg_dump -Fc` of the database and an object export, the database dropped and
 * the bucket gone, then `pg_restore --no-owner --role=<app role>` into a new empty database
 * owned by an application role, the objects imported into a new bucket, and the API (and a
 * worker) started again on what was restored.
 */
const run = promisify(execFile);
const FS = 48000;
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 0.5, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.1 });
const stimulus = stimulusAsPlayed(spec).channels[0]!;
const mask: MaskCheckInput[] = [
  { id: 'response', kind: 'magnitude-envelope', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 100, db: -1 }, { hz: 16000, db: -1 }] },
  { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -16, max: -10 },
];

const work = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-restore-drill-'));
const quote = (name: string) => `"${name.replace(/"/g, '""')}"`;
const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');
const withoutLinks = ({ links: _links, ...rest }: CaptureDto) => rest;
let before: Stack | undefined;
let after: Stack | undefined;

async function admin(sql: string): Promise<void> {
  const client = new pg.Client({ connectionString: inject('pgAdminUrl') });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}

async function api<T>(stack: Stack, token: string, route: string, init: RequestInit = {}): Promise<{ status: number; body: T; bytes: Buffer }> {
  const res = await fetch(`${stack.url}${route}`, { ...init, headers: { authorization: `Bearer ${token}`, ...(init.headers ?? {}) } });
  const bytes = Buffer.from(await res.arrayBuffer());
  const json = res.headers.get('content-type')?.includes('json');
  return { status: res.status, body: (json ? JSON.parse(bytes.toString('utf8')) : undefined) as T, bytes };
}

async function signIn(stack: Stack): Promise<string> {
  const res = await fetch(`${stack.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'engineer@example.test', password: TEST_PASSWORD }) });
  expect(res.status).toBe(200);
  return ((await res.json()) as { accessToken: string }).accessToken;
}

async function upload(stack: Stack, token: string, sha: string, samples: Float64Array): Promise<CaptureDto> {
  const res = await api<CaptureDto>(stack, token, `/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=eq&target=board`, {
    method: 'POST',
    headers: { 'content-type': 'audio/wav' },
    body: Buffer.from(encodeWav([samples], FS, { encoding: 'float', bitsPerSample: 32 })),
  });
  expect(res.status).toBe(202);
  return res.body;
}

const judged = (stack: Stack, token: string, id: string) =>
  waitFor(
    async () => {
      const now = (await api<CaptureDto>(stack, token, `/api/v1/captures/${id}`)).body;
      return now.verdict ? now : null;
    },
    { what: `a verdict for capture ${id}`, timeoutMs: 30_000, intervalMs: 150 },
  );

/** Each capture's listening WAV, by SHA-256 (what a person opens on the capture page). */
async function wavHashes(stack: Stack, session: string, ids: string[]): Promise<Record<string, string>> {
  const hashes: Record<string, string> = {};
  for (const id of ids) {
    const res = await api(stack, session, `/api/projects/alpha-dsp/captures/${id}/audio/capture`);
    expect(res.status, `audio of ${id}`).toBe(200);
    hashes[id] = sha256(res.bytes);
  }
  return hashes;
}

afterAll(async () => {
  await before?.close().catch(() => {});
  await after?.close().catch(() => {});
  fs.rmSync(work, { recursive: true, force: true });
});

describe('restore drill', () => {
  it('restores the database and the objects, and every capture and verdict reads the same', async () => {
    // 1. A gate in use: two builds, a pass and a fail each, judged by a real worker; a stimulus download and a plot stored.
    before = await startStack();
    const em = before.orm.em.fork();
    const project = before.fixture.project.id;
    em.create(Target, { project, key: 'board', name: 'Board', sampleRate: FS });
    const eq = em.create(TestCase, { project, key: 'eq', name: 'EQ sweep', stimulus: spec });
    em.create(MaskRevision, { testCase: eq, revision: 1, state: 'approved', checks: mask, settings: testCaseSettings(eq), author: before.fixture.users.engineer.id, reviewer: before.fixture.users.qa_manager.id });
    await em.flush();
    await before.startWorker();
    const ciToken = before.ciToken;
    const bump = (x: Float64Array) => applyBiquad(x, peakingEqCoefficients(FS, 8000, 2, 2));
    const uploaded = [await upload(before, ciToken, 'aaaa001', delay(stimulus, 11)), await upload(before, ciToken, 'aaaa001', bump(delay(stimulus, 11))), await upload(before, ciToken, 'bbbb002', delay(stimulus, 23)), await upload(before, ciToken, 'bbbb002', bump(delay(stimulus, 23)))];
    const captures = await Promise.all(uploaded.map((c) => judged(before!, ciToken, c.id)));
    expect(captures.map((c) => c.verdict!.outcome)).toEqual(['pass', 'fail', 'pass', 'fail']);
    const ids = captures.map((c) => c.id);
    const session = await signIn(before);
    const wavsBefore = await wavHashes(before, session, ids);
    expect((await api(before, ciToken, '/api/v1/projects/alpha-dsp/test-cases/eq/stimulus.wav')).status).toBe(200);
    expect((await api(before, session, `/api/projects/alpha-dsp/captures/${ids[0]}/plot`)).status).toBe(200);
    const keysBefore: string[] = [];
    for await (const o of before.objectStore.listAll()) keysBefore.push(o.key);
    expect(keysBefore.filter((k) => k.startsWith('captures/'))).toHaveLength(4);
    expect(keysBefore.some((k) => k.startsWith('stimuli/'))).toBe(true);
    expect(keysBefore.some((k) => k.startsWith('plot-cache/'))).toBe(true);

    // 2. Back up: the database first, then the objects (the order of the operations guide).
    const dump = path.join(work, 'earmark.dump');
    const databaseUrl = before.workerEnv.EARMARK_DATABASE_URL;
    await run('/usr/bin/pg_dump', ['--format=custom', `--file=${dump}`, `--dbname=${databaseUrl}`]);
    // A capture accepted after the dump: its object is in the export, its row is not.
    const late = await upload(before, ciToken, 'cccc003', delay(stimulus, 5));
    const objectsDir = path.join(work, 'objects');
    const exported = await exportObjects(before.objectStore, objectsDir);
    expect(exported.completion.objects).toBe(keysBefore.length + 1);

    // 3. Disaster: the database is dropped and the bucket's storage deleted (close() does both).
    const lateKey = (await before.orm.em.fork().findOneOrFail(Capture, { id: late.id })).objectKey;
    await before.close();
    before = undefined;

    // 4. Restore into a new, empty database owned by an application role that is no superuser.
    const role = `earmark_drill_${randomBytes(4).toString('hex')}`;
    const password = randomBytes(12).toString('hex');
    const database = `earmark_t_drill_${randomBytes(4).toString('hex')}`;
    await admin(`create role ${quote(role)} login password '${password}' nosuperuser nocreatedb nocreaterole`);
    await admin(`create database ${quote(database)} owner ${quote(role)}`);
    const adminToNew = new URL(inject('pgAdminUrl'));
    adminToNew.pathname = `/${database}`;
    await run('/usr/bin/pg_restore', ['--no-owner', `--role=${role}`, '--exit-on-error', `--dbname=${adminToNew.toString()}`, dump]);
    const appUrl = new URL(adminToNew.toString());
    appUrl.username = role;
    appUrl.password = password;

    after = await startStack({
      seed: 'none',
      database: {
        url: appUrl.toString(),
        async drop() {
          await admin(`drop database if exists ${quote(database)} with (force)`);
          await admin(`drop role if exists ${quote(role)}`);
        },
      },
    });
    // Objects into the new (empty) bucket; run twice, the second finds everything in place.
    expect(await importObjects(after.objectStore, objectsDir)).toMatchObject({ objects: keysBefore.length + 1, copied: keysBefore.length + 1 });
    expect(await importObjects(after.objectStore, objectsDir)).toMatchObject({ copied: 0, skipped: keysBefore.length + 1 });

    // 5. Everything reads as before: each capture and verdict, number for number, and each WAV byte for byte.
    for (const capture of captures) {
      const now = await api<CaptureDto>(after, ciToken, `/api/v1/captures/${capture.id}`);
      expect(now.status).toBe(200);
      expect(withoutLinks(now.body)).toEqual(withoutLinks(capture));
      const row = await after.orm.em.fork().findOneOrFail(Capture, { id: capture.id });
      expect(sha256(await after.objectStore.get(row.objectKey))).toBe(row.sha256);
    }
    expect(await wavHashes(after, await signIn(after), ids)).toEqual(wavsBefore);

    // The late capture's object came back without a row: an orphan, unreachable through the API.
    expect((await api(after, ciToken, `/api/v1/captures/${late.id}`)).status).toBe(404);
    expect((await after.objectStore.head(lateKey)).size).toBeGreaterThan(0);
    await after.objectStore.delete(lateKey);
    await expect(after.objectStore.head(lateKey)).rejects.toBeInstanceOf(ObjectMissingError);

    // 6. The restored gate keeps working: the application role runs the queue and a worker judges a new capture.
    await after.startWorker();
    const fresh = await judged(after, ciToken, (await upload(after, ciToken, 'dddd004', bump(delay(stimulus, 7)))).id);
    expect(fresh.verdict!.outcome).toBe('fail');
    expect(fresh.verdict!.checks.find((c) => c.id === 'response')!.margin).toBeCloseTo(captures[1]!.verdict!.checks.find((c) => c.id === 'response')!.margin!, 1);
  }, 90_000);
});
