import { fork } from 'node:child_process';
import fs from 'node:fs';

export interface S3Fake {
  endpoint: string;
  close(): Promise<void>;
}

/**
 * The local S3-compatible fake (s3rver) on loopback only, objects kept in `directory` (0700,
 * files 0600: it runs in its own process with umask 077); port 0 picks a free one.
 * s3rver does not verify request signatures, so anyone who can reach the port can read and
 * write: it must never listen beyond 127.0.0.1.
 */
export async function startS3Fake(opts: { port: number; directory: string; bucket: string }): Promise<S3Fake> {
  fs.mkdirSync(opts.directory, { recursive: true, mode: 0o700 });
  fs.chmodSync(opts.directory, 0o700); // a folder left by an older run may be world-readable
  // s3rver seals ListObjectsV2 continuation tokens with DES, which OpenSSL 3 keeps in its legacy
  // provider: without it every listing past the first page (1000 keys) fails with a 500.
  const child = fork(new URL('./s3-fake-process.mjs', import.meta.url), [JSON.stringify(opts)], { execArgv: ['--openssl-legacy-provider'], stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
  const listening = await new Promise<{ address: string; port: number }>((resolve, reject) => {
    child.once('message', (m) => resolve(m as { address: string; port: number }));
    child.once('error', reject);
    child.once('exit', (code) => reject(new Error(`The S3 fake stopped before listening (exit code ${code}).`)));
  });
  if (listening.address !== '127.0.0.1') {
    child.kill();
    throw new Error(`The S3 fake listens on ${listening.address}, not on loopback only.`);
  }
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  return {
    endpoint: `http://127.0.0.1:${listening.port}`,
    close: async () => {
      if (child.exitCode === null && child.connected) child.send('close');
      await exited;
    },
  };
}
