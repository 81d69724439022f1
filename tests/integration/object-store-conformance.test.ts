import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { startS3Fake } from '@earmark/infra/fakes';
import { ObjectMissingError, ObjectStore, ObjectStoreUnavailableError, type ObjectStoreConfig } from '@earmark/platform';
import { buildApp, interceptLocalhostDns } from 'fauxqs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

/**
 * The object store's contract, run against two independent S3-compatible servers: s3rver (the
 * development and test fake) and fauxqs (a second implementation, in-process). Behaviour the
 * product relies on must hold on both, so it does not depend on one fake's quirks.
 */
interface S3Server {
  endpoint: string;
  stop(): Promise<void>;
}

const servers: Record<string, () => Promise<S3Server>> = {
  async s3rver() {
    const directory = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-conformance-s3-'));
    const fake = await startS3Fake({ port: 0, directory, bucket: 'earmark-preset' });
    return {
      endpoint: fake.endpoint,
      async stop() {
        await fake.close();
        fs.rmSync(directory, { recursive: true, force: true });
      },
    };
  },
  async fauxqs() {
    // Its own start-up listens on every interface; the app alone lets us keep it on loopback.
    const app = buildApp({ logger: false });
    const address = await app.listen({ port: 0, host: '127.0.0.1' });
    return { endpoint: address, stop: () => app.close() };
  },
};

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');
const bytesOf = async (stream: Readable) => Buffer.concat(await stream.toArray());

describe.each(Object.keys(servers))('object store on %s', (name) => {
  let server: S3Server;
  let serverStopped = false;
  const stores: ObjectStore[] = [];
  // s3rver knows one key pair and checks the signature's key id; fauxqs takes any.
  const storeFor = (extra: Partial<ObjectStoreConfig> = {}) => {
    const store = new ObjectStore({ endpoint: server.endpoint, bucket: 'conformance', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', ...extra });
    stores.push(store);
    return store;
  };
  let store: ObjectStore;

  beforeAll(async () => {
    server = await servers[name]!();
    store = storeFor();
  });
  afterAll(async () => {
    for (const s of stores) s.destroy();
    if (!serverStopped) await server?.stop();
  });

  it('creates a missing bucket once; ping answers for it and refuses a missing one', async () => {
    await expect(store.ping()).rejects.toBeInstanceOf(ObjectStoreUnavailableError);
    await store.ensureBucket();
    await store.ensureBucket(); // already there: nothing to do, no error
    await expect(store.ping()).resolves.toBeUndefined();
    await expect(storeFor({ bucket: 'conformance-absent' }).ping()).rejects.toThrow(/conformance-absent not reachable \(HTTP 404\)/);
  });

  it('keeps bytes, content type and metadata; get, getStream and head return them', async () => {
    const bytes = Buffer.from(Array.from({ length: 70_001 }, (_, i) => (i * 31) % 256));
    await store.put('captures/alpha/0a1b2c3/one.wav', bytes, 'audio/wav', { sha256: sha256(bytes) }, { payloadSha256: sha256(bytes) });

    expect(sha256(await store.get('captures/alpha/0a1b2c3/one.wav'))).toBe(sha256(bytes));
    const streamed = await store.getStream('captures/alpha/0a1b2c3/one.wav');
    expect({ size: streamed.size, contentType: streamed.contentType, metadata: streamed.metadata }).toEqual({ size: 70_001, contentType: 'audio/wav', metadata: { sha256: sha256(bytes) } });
    expect(sha256(await bytesOf(streamed.body))).toBe(sha256(bytes));
    const head = await store.head('captures/alpha/0a1b2c3/one.wav');
    expect({ size: head.size, contentType: head.contentType, metadata: head.metadata }).toEqual({ size: 70_001, contentType: 'audio/wav', metadata: { sha256: sha256(bytes) } });
    expect(head.etag?.replace(/"/g, '')).toBe(createHash('md5').update(bytes).digest('hex'));
    expect(Math.abs(head.lastModified!.getTime() - Date.now())).toBeLessThan(60_000);
  });

  it('stores a stream of known length signed with its hash', async () => {
    const bytes = Buffer.from('streamed capture body, written without holding it in memory '.repeat(500));
    await store.putStream('stimuli/test/stream.wav', Readable.from([bytes.subarray(0, 1000), bytes.subarray(1000)]), bytes.length, 'audio/wav', { origin: 'stream' }, sha256(bytes));
    expect((await store.get('stimuli/test/stream.wav')).equals(bytes)).toBe(true);
    expect((await store.head('stimuli/test/stream.wav')).metadata).toEqual({ origin: 'stream' });
  });

  it('lists every key under a prefix page by page, in key order, with size and time', async () => {
    const paged = storeFor({ listPageSize: 3 });
    const keys = Array.from({ length: 8 }, (_, i) => `plot-cache/c${i}/p.json`);
    for (const [i, key] of keys.entries()) await paged.put(key, Buffer.alloc(i + 1, 7), 'application/json');
    await paged.put('plot-cachex/outside.json', Buffer.from('{}'), 'application/json');

    const listed = [];
    for await (const o of paged.listAll('plot-cache/')) listed.push(o);
    expect(listed.map((o) => [o.key, o.size])).toEqual(keys.map((k, i) => [k, i + 1]));
    for (const o of listed) expect(Math.abs(o.lastModified.getTime() - Date.now())).toBeLessThan(60_000);
    // list() is one page (S3's default of 1000 keys) and the same keys.
    expect(await store.list('plot-cache/')).toEqual(keys);
    const everything = [];
    for await (const o of paged.listAll()) everything.push(o.key);
    expect(everything).toEqual([...everything].sort());
    expect(everything).toEqual(expect.arrayContaining([...keys, 'plot-cachex/outside.json', 'stimuli/test/stream.wav']));
  });

  it('deletes; a missing key is ObjectMissingError for get, getStream and head', async () => {
    await store.put('captures/alpha/gone.wav', Buffer.from('x'), 'audio/wav');
    await store.delete('captures/alpha/gone.wav');
    await store.delete('captures/alpha/gone.wav'); // deleting what is not there is no error (S3)
    await expect(store.get('captures/alpha/gone.wav')).rejects.toBeInstanceOf(ObjectMissingError);
    await expect(store.getStream('captures/alpha/gone.wav')).rejects.toBeInstanceOf(ObjectMissingError);
    await expect(store.head('captures/alpha/gone.wav')).rejects.toBeInstanceOf(ObjectMissingError);
    expect(await store.list('captures/alpha/gone')).toEqual([]);
  });

  it('accepts server-side encryption on writes (SSE-S3 and SSE-KMS with a key id)', async () => {
    const sseS3 = storeFor({ serverSideEncryption: 'AES256' });
    const sseKms = storeFor({ serverSideEncryption: 'aws:kms', sseKmsKeyId: 'arn:aws:kms:eu-west-1:000000000000:key/fictional' });
    await sseS3.put('captures/sse/s3.wav', Buffer.from('aes'), 'audio/wav');
    await sseKms.putStream('captures/sse/kms.wav', Readable.from([Buffer.from('kms')]), 3, 'audio/wav', {}, sha256(Buffer.from('kms')));
    expect((await store.get('captures/sse/s3.wav')).toString()).toBe('aes');
    expect((await store.get('captures/sse/kms.wav')).toString()).toBe('kms');
  });

  it.runIf(name === 'fauxqs')('addresses the bucket by host name when path style is off', async () => {
    // s3rver takes a virtual host only under its service endpoint (s3.amazonaws.com), fauxqs under
    // any name: *.localhost is resolved to loopback for this test only.
    const restore = interceptLocalhostDns();
    try {
      const virtual = storeFor({ endpoint: server.endpoint.replace('127.0.0.1', 'localhost'), forcePathStyle: false });
      await virtual.put('captures/vhost.wav', Buffer.from('virtual'), 'audio/wav');
      expect((await store.get('captures/vhost.wav')).toString()).toBe('virtual');
      expect(await virtual.list('captures/vhost')).toEqual(['captures/vhost.wav']);
    } finally {
      restore();
    }
  });

  it('reports a store that is down as ObjectStoreUnavailableError, never as a missing object', async () => {
    await server.stop();
    serverStopped = true;
    await expect(store.ping()).rejects.toBeInstanceOf(ObjectStoreUnavailableError);
    await expect(store.get('captures/alpha/0a1b2c3/one.wav')).rejects.toBeInstanceOf(ObjectStoreUnavailableError);
    await expect(store.head('captures/alpha/0a1b2c3/one.wav')).rejects.toBeInstanceOf(ObjectStoreUnavailableError);
    await expect(store.put('captures/down.wav', Buffer.from('x'), 'audio/wav')).rejects.toBeInstanceOf(ObjectStoreUnavailableError);
    await expect(store.putStream('captures/down.wav', Readable.from([Buffer.from('x')]), 1, 'audio/wav', {}, sha256(Buffer.from('x')))).rejects.toBeInstanceOf(ObjectStoreUnavailableError);
    const listing = store.listAll('captures/');
    await expect(listing.next()).rejects.toBeInstanceOf(ObjectStoreUnavailableError);
  });
});
