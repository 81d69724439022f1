import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { Readable } from 'node:stream';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { ObjectStore, ObjectStoreUnavailableError, type ObjectStoreConfig } from '../src/object-store/object-store.js';

/** What the store sends for the production options, read off a loopback server that records each request. */
interface Seen {
  method: string;
  url: string;
  headers: http.IncomingHttpHeaders;
}
let seen: Seen[] = [];
let answerStatus = 200;
let server: http.Server;
let endpoint = '';
const stores: ObjectStore[] = [];

beforeAll(async () => {
  server = http.createServer((req, res) => {
    req.resume();
    req.on('end', () => {
      // The path alone: the SDK adds its own query (x-id=PutObject).
      seen.push({ method: req.method ?? '', url: new URL(req.url ?? '/', 'http://127.0.0.1').pathname, headers: req.headers });
      res.writeHead(answerStatus).end();
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  endpoint = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterEach(() => {
  seen = [];
  answerStatus = 200;
});
afterAll(async () => {
  for (const s of stores) s.destroy();
  await new Promise((resolve) => server.close(resolve));
});

const storeWith = (extra: Partial<ObjectStoreConfig>) => {
  const store = new ObjectStore({ endpoint, bucket: 'earmark-captures', accessKeyId: 'AKIDFICTIONAL', secretAccessKey: 'fictional-secret', ...extra });
  stores.push(store);
  return store;
};
const SHA_OF_ABC = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';

describe('server-side encryption', () => {
  it('asks for no encryption by default (the bucket default applies)', async () => {
    await storeWith({}).put('captures/a.wav', Buffer.from('abc'), 'audio/wav');
    expect(seen).toHaveLength(1);
    expect(seen[0]!.headers['x-amz-server-side-encryption']).toBeUndefined();
  });

  it('asks for SSE-S3 on every write, buffer or stream', async () => {
    const store = storeWith({ serverSideEncryption: 'AES256' });
    await store.put('captures/a.wav', Buffer.from('abc'), 'audio/wav');
    await store.putStream('captures/b.wav', Readable.from([Buffer.from('abc')]), 3, 'audio/wav', {}, SHA_OF_ABC);
    expect(seen.map((r) => [r.method, r.url, r.headers['x-amz-server-side-encryption'], r.headers['x-amz-server-side-encryption-aws-kms-key-id']])).toEqual([
      ['PUT', '/earmark-captures/captures/a.wav', 'AES256', undefined],
      ['PUT', '/earmark-captures/captures/b.wav', 'AES256', undefined],
    ]);
  });

  it('asks for SSE-KMS with the configured key, and signs a stream with the given hash', async () => {
    const store = storeWith({ serverSideEncryption: 'aws:kms', sseKmsKeyId: 'arn:aws:kms:eu-west-1:000000000000:key/fictional' });
    await store.putStream('captures/b.wav', Readable.from([Buffer.from('abc')]), 3, 'audio/wav', { sha256: SHA_OF_ABC }, SHA_OF_ABC);
    const headers = seen[0]!.headers;
    expect(headers['x-amz-server-side-encryption']).toBe('aws:kms');
    expect(headers['x-amz-server-side-encryption-aws-kms-key-id']).toBe('arn:aws:kms:eu-west-1:000000000000:key/fictional');
    expect(headers['x-amz-content-sha256']).toBe(SHA_OF_ABC);
    expect(headers['x-amz-meta-sha256']).toBe(SHA_OF_ABC);
    expect(headers['content-length']).toBe('3');
  });
});

describe('credentials and addressing', () => {
  it('uses the default credential chain when no keys are configured', async () => {
    const saved = { id: process.env.AWS_ACCESS_KEY_ID, secret: process.env.AWS_SECRET_ACCESS_KEY };
    process.env.AWS_ACCESS_KEY_ID = 'AKIDFROMTHECHAIN';
    process.env.AWS_SECRET_ACCESS_KEY = 'chain-secret';
    try {
      const store = new ObjectStore({ endpoint, bucket: 'earmark-captures', region: 'eu-west-1' });
      stores.push(store);
      await store.put('captures/a.wav', Buffer.from('abc'), 'audio/wav');
    } finally {
      for (const [name, value] of [['AWS_ACCESS_KEY_ID', saved.id], ['AWS_SECRET_ACCESS_KEY', saved.secret]] as const) {
        if (value === undefined) delete process.env[name];
        else process.env[name] = value;
      }
    }
    expect(seen[0]!.headers.authorization).toMatch(/Credential=AKIDFROMTHECHAIN\/\d{8}\/eu-west-1\/s3\/aws4_request/);
  });

  it('puts the bucket in the path by default', async () => {
    await storeWith({ region: 'eu-west-1' }).put('stimuli/x.wav', Buffer.from('abc'), 'audio/wav');
    expect(seen[0]!.url).toBe('/earmark-captures/stimuli/x.wav');
    expect(seen[0]!.headers.authorization).toMatch(/Credential=AKIDFICTIONAL\//);
  });
});

describe('ping', () => {
  it('resolves when the bucket answers a HEAD', async () => {
    await storeWith({}).ping();
    expect(seen.map((r) => [r.method, r.url])).toEqual([['HEAD', '/earmark-captures/']]);
  });

  it.each([
    [403, /earmark-captures not reachable \(HTTP 403\)/],
    [404, /earmark-captures not reachable \(HTTP 404\)/],
    [503, /earmark-captures not reachable/],
  ])('answers %i as ObjectStoreUnavailableError', async (status, message) => {
    answerStatus = status;
    const failure = await storeWith({}).ping().catch((error: unknown) => error);
    expect(failure).toBeInstanceOf(ObjectStoreUnavailableError);
    expect(String(failure)).toMatch(message);
  });
});
