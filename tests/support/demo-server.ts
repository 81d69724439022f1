import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createApp, loadApiEnv } from '@earmark/api';
import { generateTokenSecret, initOrm, seedDemo } from '@earmark/db';
import { createTestDatabase } from '@earmark/db/testing';
import { pino } from 'pino';

const webDist = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../apps/web/dist');

/** The real API serving the built web app, on an ephemeral port, over a demo-seeded database. */
export async function startDemoServer() {
  const db = await createTestDatabase();
  const orm = await initOrm({ url: db.url, poolMax: 5 });
  await seedDemo(orm.em.fork(), generateTokenSecret());
  const env = loadApiEnv({
    EARMARK_DATABASE_URL: db.url,
    EARMARK_JWT_SECRET: 'e2e-secret-e2e-secret-e2e-secret-e2e-secret',
    EARMARK_WEB_DIST: webDist,
  });
  const { app } = createApp({ orm, env, logger: pino({ level: 'silent' }) });
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  return {
    url: `http://127.0.0.1:${(server.address() as AddressInfo).port}`,
    async close() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await orm.close();
      await db.drop();
    },
  };
}
