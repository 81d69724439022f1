import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createApiRuntime, createApp, loadApiEnv } from '@earmark/api';
import fs from 'node:fs';
import os from 'node:os';
import { initOrm, seedDemo } from '@earmark/db';
import { generateTokenSecret } from '@earmark/platform';
import { startS3Fake } from '@earmark/infra/fakes';
import { createTestDatabase } from '@earmark/db/testing';
import { pino } from 'pino';

const webDist = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../apps/web/dist');

/** The real API serving the built web app, on an ephemeral port, over a demo-seeded database. */
export async function startDemoServer() {
  const db = await createTestDatabase();
  const orm = await initOrm({ url: db.url, poolMax: 5 });
  await seedDemo(orm.em.fork(), generateTokenSecret());
  const s3Dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-e2e-s3-'));
  const s3 = await startS3Fake({ port: 0, directory: s3Dir, bucket: 'earmark-captures' });
  const logger = pino({ level: 'silent' });
  const env = loadApiEnv({
    EARMARK_S3_ENDPOINT: s3.endpoint,
    EARMARK_DATABASE_URL: db.url,
    EARMARK_JWT_SECRET: 'e2e-secret-e2e-secret-e2e-secret-e2e-secret',
    EARMARK_WEB_DIST: webDist,
  });
  const runtime = await createApiRuntime(env, logger, { orm });
  const { app } = createApp(runtime);
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  return {
    url: `http://127.0.0.1:${(server.address() as AddressInfo).port}`,
    async close() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await runtime.close();
      await s3.close();
      fs.rmSync(s3Dir, { recursive: true, force: true });
      await db.drop();
    },
  };
}
