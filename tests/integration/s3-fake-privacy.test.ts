import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { startS3Fake, type S3Fake } from '@earmark/infra/fakes';
import { ObjectStore } from '@earmark/platform';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

/** The development object store keeps captures on disk: only their owner may read them. */
let root = '';
let directory = '';
let s3: S3Fake;

beforeAll(async () => {
  root = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-s3-privacy-'));
  directory = path.join(root, 's3');
  s3 = await startS3Fake({ port: 0, directory, bucket: 'earmark-captures' });
});
afterAll(async () => {
  await s3?.close();
  fs.rmSync(root, { recursive: true, force: true });
});

function connects(host: string, port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = net.connect({ host, port, timeout: 2000 }, () => {
      socket.destroy();
      resolve(true);
    });
    socket.once('error', () => resolve(false));
    socket.once('timeout', () => {
      socket.destroy();
      resolve(false);
    });
  });
}

const modeOf = (p: string) => fs.statSync(p).mode & 0o777;

/** Every file and folder under `dir`, itself included. */
function walk(dir: string): string[] {
  return [dir, ...fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? walk(path.join(dir, e.name)) : [path.join(dir, e.name)]))];
}

describe('the S3 fake', () => {
  it('listens on loopback only', async () => {
    const { hostname, port } = new URL(s3.endpoint);
    expect(hostname).toBe('127.0.0.1');
    expect(await connects('127.0.0.1', Number(port))).toBe(true);
    // Another address of this machine, when it has one, must refuse the connection.
    const external = Object.values(os.networkInterfaces()).flat().find((i) => i && i.family === 'IPv4' && !i.internal);
    if (external) expect(await connects(external.address, Number(port))).toBe(false);
  });

  it('keeps its folder 0700 and a stored object 0600, whatever the umask', async () => {
    const store = new ObjectStore({ endpoint: s3.endpoint, bucket: 'earmark-captures', region: 'us-east-1', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' });
    await store.put('captures/privacy/one.wav', Buffer.from('RIFF-not-really'), 'audio/wav');
    expect(Buffer.from(await store.get('captures/privacy/one.wav')).toString()).toBe('RIFF-not-really');

    expect(modeOf(directory)).toBe(0o700);
    const entries = walk(directory);
    const objectFile = entries.find((p) => p.endsWith(path.join('captures', 'privacy', 'one.wav', '._S3rver_object')) || p.endsWith('one.wav._S3rver_object'));
    expect(objectFile, entries.join('\n')).toBeDefined();
    expect(modeOf(objectFile!)).toBe(0o600);
    const open = entries.filter((p) => (modeOf(p) & 0o077) !== 0).map((p) => `${path.relative(directory, p)} ${modeOf(p).toString(8)}`);
    expect(open).toEqual([]);
  });
});
