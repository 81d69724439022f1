import fs from 'node:fs';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { createApiRuntime, createApp, loadApiEnv, type ApiRuntime } from '@earmark/api';
import { ApiToken, initOrm, seedDemo, seedRoles, type RoleFixture } from '@earmark/db';
import { generateTokenSecret, type ObjectStore } from '@earmark/platform';
import { createTestDatabase } from '@earmark/db/testing';
import { startS3Fake, startSmtpFake, type S3Fake, type SmtpFake } from '@earmark/infra/fakes';
import type { MikroORM } from '@mikro-orm/postgresql';
import { pino } from 'pino';
import { onFreePorts } from './free-port.js';
import { startWorkerProcess, type WorkerProcess } from './worker-process.js';

export interface Stack {
  url: string;
  orm: MikroORM;
  /** The role fixture (seed `roles`); not set for the demo seed or a restored database. */
  fixture: RoleFixture;
  /** A CI token of the fixture project (or of kestrel-buds for the demo) with both scopes. */
  ciToken: string;
  workerEnv: Record<string, string>;
  /** The API's object store (captures, plot cache). */
  objectStore: ObjectStore;
  /** The S3 fake's folder, where that store keeps its objects. */
  objectsDir: string;
  /** The in-process API's composition root (its metrics registry and probes). */
  apiRuntime: ApiRuntime;
  smtp: { inboxUrl: string; stop(): Promise<void>; restart(): Promise<void> };
  startWorker(extraEnv?: Record<string, string>): Promise<WorkerProcess>;
  close(): Promise<void>;
}

/**
 * Everything on loopback for one test file: its own database, the S3 and SMTP fakes,
 * the API in-process and (on demand) real worker processes. `objectsFrom`: an S3 fake's folder
 * copied in before the fake starts (with a restored database, the objects it refers to).
 */
export async function startStack(opts: { seed?: 'roles' | 'demo' | 'none'; database?: { url: string; drop(): Promise<void> }; objectsFrom?: string } = {}): Promise<Stack> {
  // Inside vitest each file clones its own database; scripts (benchmarks) bring one.
  const db = opts.database ?? (await createTestDatabase());
  const orm = await initOrm({ url: db.url, poolMax: 6 });
  const secret = generateTokenSecret();
  // `roles`: alpha-dsp with one user per role; `demo`: the Fernwick demo with its CI token;
  // `none`: the database already holds its data (a restore), so no fixture and no new CI token.
  const noFixture = null as unknown as RoleFixture;
  const fixture = opts.seed === 'none' ? noFixture : opts.seed === 'demo' ? await seedDemo(orm.em.fork(), secret).then(() => noFixture) : await seedRoles(orm.em.fork());
  const s3Dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-stack-s3-'));
  if (opts.objectsFrom) fs.cpSync(opts.objectsFrom, s3Dir, { recursive: true });
  const s3: S3Fake = await startS3Fake({ port: 0, directory: s3Dir, bucket: 'earmark-captures' });
  const mail = await onFreePorts(2, async ([smtpPort, inboxPort]) => ({ smtpPort: smtpPort!, inboxPort: inboxPort!, fake: await startSmtpFake({ smtpPort: smtpPort!, webPort: inboxPort! }) }));
  const { smtpPort, inboxPort } = mail;
  let smtp: SmtpFake = mail.fake;
  const logger = pino({ level: 'silent' });
  const env = loadApiEnv({
    EARMARK_DATABASE_URL: db.url,
    EARMARK_JWT_SECRET: 'stack-secret-stack-secret-stack-secret-0123',
    EARMARK_S3_ENDPOINT: s3.endpoint,
    // A helper's private build (`vite build --outDir …`) may stand in for the shared one.
    EARMARK_WEB_DIST: process.env.EARMARK_TEST_WEB_DIST ?? path.resolve(import.meta.dirname, '../../apps/web/dist'),
    EARMARK_LOG_LEVEL: 'silent',
  });
  const runtime = await createApiRuntime(env, logger, { orm });
  const { objectStore } = runtime;
  const { app } = createApp(runtime);
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  if (opts.seed !== 'demo' && opts.seed !== 'none') {
    const em = orm.em.fork();
    em.create(ApiToken, { project: fixture.project.id, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: fixture.users.admin.id });
    await em.flush();
  }

  const workerEnv = {
    EARMARK_DATABASE_URL: db.url,
    EARMARK_S3_ENDPOINT: s3.endpoint,
    EARMARK_SMTP_PORT: String(smtpPort),
    EARMARK_PUBLIC_URL: url,
    EARMARK_SWEEP_INTERVAL_S: '1',
    EARMARK_JOB_RETRY_DELAY_S: '1',
    EARMARK_JOB_MAINTENANCE_S: '1',
    EARMARK_ANALYSIS_EXPIRE_S: '4',
    EARMARK_ANALYSIS_SLOTS: '1',
  };
  const workers: WorkerProcess[] = [];
  return {
    url,
    orm,
    fixture,
    ciToken: opts.seed === 'none' ? '' : secret.token,
    workerEnv,
    objectStore,
    objectsDir: s3Dir,
    apiRuntime: runtime,
    smtp: {
      inboxUrl: smtp.inboxUrl,
      stop: () => smtp.close(),
      async restart() {
        smtp = await startSmtpFake({ smtpPort, webPort: inboxPort });
      },
    },
    async startWorker(extraEnv = {}) {
      const worker = await startWorkerProcess({ ...workerEnv, ...extraEnv });
      workers.push(worker);
      return worker;
    },
    async close() {
      await Promise.all(workers.map((w) => w.stop()));
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await runtime.close();
      await s3.close();
      await smtp.close().catch(() => {});
      fs.rmSync(s3Dir, { recursive: true, force: true });
      await db.drop();
    },
  };
}
