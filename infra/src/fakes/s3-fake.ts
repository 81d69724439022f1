import fs from 'node:fs';
import S3rver from 's3rver';

export interface S3Fake {
  endpoint: string;
  close(): Promise<void>;
}

/** The local S3-compatible fake (s3rver) on loopback, objects kept in `directory`; port 0 picks a free one. */
export async function startS3Fake(opts: { port: number; directory: string; bucket: string }): Promise<S3Fake> {
  fs.mkdirSync(opts.directory, { recursive: true });
  const server = new S3rver({
    port: opts.port,
    address: '127.0.0.1',
    directory: opts.directory,
    silent: true,
    configureBuckets: [{ name: opts.bucket }],
  });
  const { port } = await server.run();
  return { endpoint: `http://127.0.0.1:${port}`, close: () => server.close() };
}
