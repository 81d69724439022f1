import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { startS3Fake, type S3Fake } from '@earmark/infra/fakes';
import { ObjectExportInvalidError, ObjectStore, exportObjects, importObjects, type ExportedObject, type TransferProgress } from '@earmark/platform';
import { buildApp } from 'fauxqs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

/** Object export and import (backup and restore of the bucket) against the S3 fake, and across to a second implementation. */
let root = '';
let s3: S3Fake;
const stores: ObjectStore[] = [];
const storeOf = (bucket: string, endpoint = s3.endpoint) => {
  const store = new ObjectStore({ endpoint, bucket, accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', listPageSize: 4 });
  stores.push(store);
  return store;
};
let source: ObjectStore;

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');
const pseudoRandom = (size: number, seed: number) => Buffer.from(Array.from({ length: size }, (_, i) => (i * 2654435761 + seed * 40503) >>> 24));

// Six objects in three prefixes; two of them with the same bytes (stored once in the export).
interface Fixture {
  key: string;
  bytes: Buffer;
  type: string;
  metadata: Record<string, string>;
}
const capture = (key: string, bytes: Buffer, type: string): Fixture => ({ key, bytes, type, metadata: { sha256: sha256(bytes) } });
const other = (key: string, bytes: Buffer, type: string): Fixture => ({ key, bytes, type, metadata: {} });
const objects: Fixture[] = [
  capture('captures/alpha-dsp/aaaa001/c1.wav', pseudoRandom(3_000_000, 1), 'audio/wav'),
  capture('captures/alpha-dsp/aaaa001/c2.f32', pseudoRandom(48_000, 2), 'application/x-earmark-f32'),
  capture('captures/alpha-dsp/bbbb002/c3.wav', pseudoRandom(48_000, 2), 'audio/wav'),
  other('plot-cache/c1/1.0.0-none-256-0.json', Buffer.from('{"columns":256}'), 'application/json'),
  other('stimuli/1.0.0/sweep.wav', pseudoRandom(96_000, 3), 'audio/wav'),
  other('stimuli/1.0.0/empty.wav', Buffer.alloc(0), 'audio/wav'),
];

const readManifest = (dir: string): ExportedObject[] =>
  fs
    .readFileSync(path.join(dir, 'manifest.jsonl'), 'utf8')
    .split('\n')
    .filter(Boolean)
    .map((line) => JSON.parse(line) as ExportedObject);

async function expectSameObjects(store: ObjectStore, expected = objects) {
  for (const o of expected) {
    const stored = await store.getStream(o.key);
    expect({ key: o.key, size: stored.size, contentType: stored.contentType, metadata: stored.metadata }).toEqual({ key: o.key, size: o.bytes.length, contentType: o.type, metadata: o.metadata });
    expect(sha256(Buffer.concat(await stored.body.toArray())), o.key).toBe(sha256(o.bytes));
  }
}

beforeAll(async () => {
  root = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-backup-'));
  s3 = await startS3Fake({ port: 0, directory: path.join(root, 's3'), bucket: 'earmark-captures' });
  source = storeOf('earmark-captures');
  for (const o of objects) await source.put(o.key, o.bytes, o.type, o.metadata);
});
afterAll(async () => {
  for (const s of stores) s.destroy();
  await s3?.close();
  fs.rmSync(root, { recursive: true, force: true });
});

describe('exportObjects', () => {
  it('writes each distinct content once, named by its hash, with a sorted manifest and a completion record', async () => {
    const dir = path.join(root, 'full');
    const progress: TransferProgress[] = [];
    const result = await exportObjects(source, dir, { onProgress: (p) => progress.push(p) });

    expect(result).toMatchObject({ objects: 6, copied: 6, skipped: 0, bytes: 3_192_015 });
    expect(result.completion).toMatchObject({ format: 'earmark-object-export', version: 1, bucket: 'earmark-captures', prefix: '', objects: 6, bytes: 3_192_015 });
    expect(progress.map((p) => p.objects)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(progress.at(-1)!.bytes).toBe(3_192_015);

    const manifest = readManifest(dir);
    expect(manifest.map((e) => e.key)).toEqual(objects.map((o) => o.key).sort());
    for (const o of objects) {
      const entry = manifest.find((e) => e.key === o.key)!;
      expect(entry).toMatchObject({ size: o.bytes.length, sha256: sha256(o.bytes), md5: createHash('md5').update(o.bytes).digest('hex'), contentType: o.type, metadata: o.metadata });
      expect(sha256(fs.readFileSync(path.join(dir, 'blobs', entry.sha256)))).toBe(entry.sha256);
    }
    // c2 and c3 have the same bytes: five files for six objects, and no partial file left.
    expect(fs.readdirSync(path.join(dir, 'blobs')).sort()).toEqual([...new Set(objects.map((o) => sha256(o.bytes)))].sort());
    expect(JSON.parse(fs.readFileSync(path.join(dir, 'export.json'), 'utf8'))).toEqual(result.completion);
  });

  it('exports only the prefix asked for', async () => {
    const result = await exportObjects(source, path.join(root, 'stimuli'), { prefix: 'stimuli/' });
    expect(result.completion).toMatchObject({ prefix: 'stimuli/', objects: 2, bytes: 96_000 });
    expect(readManifest(path.join(root, 'stimuli')).map((e) => e.key)).toEqual(['stimuli/1.0.0/empty.wav', 'stimuli/1.0.0/sweep.wav']);
  });

  it('resumes a stopped export, fetching only what it had not written, and follows changes since', async () => {
    const dir = path.join(root, 'resumed');
    let seen = 0;
    const stopped = await exportObjects(source, dir, {
      concurrency: 1,
      onProgress: () => {
        if (++seen === 2) throw new Error('operator pressed ctrl-c');
      },
    }).catch((error: unknown) => error);
    expect(String(stopped)).toMatch(/ctrl-c/);
    expect(readManifest(dir)).toHaveLength(2);
    expect(fs.existsSync(path.join(dir, 'export.json'))).toBe(false);
    // An unfinished export is refused by import.
    await expect(importObjects(storeOf('never-written'), dir)).rejects.toThrow(/no complete object export/);

    const resumed = await exportObjects(source, dir);
    expect(resumed).toMatchObject({ objects: 6, copied: 4, skipped: 2 });

    // A deleted object leaves the manifest; a rewritten one is fetched again; the rest are skipped.
    await source.delete('plot-cache/c1/1.0.0-none-256-0.json');
    await new Promise((r) => setTimeout(r, 1100)); // S3 times are whole seconds
    const rewritten = pseudoRandom(96_000, 9);
    await source.put('stimuli/1.0.0/sweep.wav', rewritten, 'audio/wav');
    const again = await exportObjects(source, dir);
    expect(again).toMatchObject({ objects: 5, copied: 1, skipped: 4 });
    const manifest = readManifest(dir);
    expect(manifest.map((e) => e.key)).not.toContain('plot-cache/c1/1.0.0-none-256-0.json');
    expect(manifest.find((e) => e.key === 'stimuli/1.0.0/sweep.wav')!.sha256).toBe(sha256(rewritten));
    // Put the source back as the other tests expect it.
    const plot = objects.find((o) => o.key.startsWith('plot-cache/'))!;
    await source.put(plot.key, plot.bytes, plot.type, plot.metadata);
    const sweep = objects.find((o) => o.key === 'stimuli/1.0.0/sweep.wav')!;
    await source.put(sweep.key, sweep.bytes, sweep.type, sweep.metadata);
  });
});

describe('importObjects', () => {
  it('restores every object with its bytes, type and metadata into an empty bucket, and skips them all when run again', async () => {
    const target = storeOf('restored-bucket');
    await target.ensureBucket();
    const first = await importObjects(target, path.join(root, 'full'));
    expect(first).toMatchObject({ objects: 6, copied: 6, skipped: 0, bytes: 3_192_015 });
    await expectSameObjects(target);

    const second = await importObjects(target, path.join(root, 'full'));
    expect(second).toMatchObject({ objects: 6, copied: 0, skipped: 6 });
  });

  it('replaces an object of the same size but other bytes (compared by hash, not size)', async () => {
    const target = storeOf('restored-bucket');
    const c2 = objects[1]!;
    await target.put(c2.key, pseudoRandom(c2.bytes.length, 77), c2.type, c2.metadata);
    const result = await importObjects(target, path.join(root, 'full'));
    expect(result).toMatchObject({ copied: 1, skipped: 5 });
    await expectSameObjects(target, [c2]);
  });

  it('refuses a file that does not match its hash, and writes nothing for it', async () => {
    const dir = path.join(root, 'corrupt');
    fs.cpSync(path.join(root, 'stimuli'), dir, { recursive: true });
    const sweep = readManifest(dir).find((e) => e.key === 'stimuli/1.0.0/sweep.wav')!;
    const blob = path.join(dir, 'blobs', sweep.sha256);
    const bytes = fs.readFileSync(blob);
    bytes.writeUInt8(bytes.readUInt8(1000) ^ 0xff, 1000);
    fs.writeFileSync(blob, bytes);

    const target = storeOf('corrupt-target');
    await target.ensureBucket();
    const failure = await importObjects(target, dir, { concurrency: 1 }).catch((error: unknown) => error);
    expect(failure).toBeInstanceOf(ObjectExportInvalidError);
    expect(String(failure)).toContain(`does not hold the 96000 bytes with SHA-256 ${sweep.sha256} that stimuli/1.0.0/sweep.wav had`);
    expect(await target.list('stimuli/')).toEqual(['stimuli/1.0.0/empty.wav']);
  });

  it('moves a bucket to a second S3 implementation', async () => {
    const app = buildApp({ logger: false });
    const endpoint = await app.listen({ port: 0, host: '127.0.0.1' });
    try {
      const other = storeOf('moved', endpoint);
      await other.ensureBucket();
      expect(await importObjects(other, path.join(root, 'full'))).toMatchObject({ objects: 6, copied: 6 });
      await expectSameObjects(other);
    } finally {
      await app.close();
    }
  });
});
