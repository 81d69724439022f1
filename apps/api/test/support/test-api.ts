import type { AddressInfo } from 'node:net';
import { Writable } from 'node:stream';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { initOrm, seedRoles, TEST_PASSWORD, type RoleFixture } from '@earmark/db';
import type { ObjectStore } from '@earmark/platform';
import { startS3Fake, type S3Fake } from '@earmark/infra/fakes';
import type PgBoss from 'pg-boss';
import { createTestDatabase } from '@earmark/db/testing';
import type { MikroORM } from '@mikro-orm/postgresql';
import type { Express } from 'express';
import { pino } from 'pino';
import { createApiRuntime, createApp, loadApiEnv, type ApiEnv, type ApiRuntime, type RouteDef } from '../../src/index.js';

export const TEST_JWT_SECRET = 'test-secret-that-is-long-enough-for-hs256-0123456789';

export interface TestApi {
  baseUrl: string;
  app: Express;
  orm: MikroORM;
  env: ApiEnv;
  fixture: RoleFixture;
  routes: RouteDef[];
  objectStore: ObjectStore;
  boss: PgBoss;
  /** The composition root itself (its compute pool, for tests that count tasks). */
  runtime: ApiRuntime;
  /** The S3 fake; tests stop and restart it to simulate an outage. */
  s3: { fake: S3Fake; directory: string; stop(): Promise<void>; restart(): Promise<void> };
  /** Every log line the app wrote, for checks that secrets stay out of logs. */
  logLines: string[];
  request(method: string, path: string, opts?: { token?: string; body?: unknown; rawBody?: string; headers?: Record<string, string> }): Promise<TestResponse>;
  login(email: string, password?: string): Promise<string>;
  close(): Promise<void>;
}

export interface TestResponse {
  status: number;
  headers: Headers;
  contentType: string;
  /** Parsed JSON; tests assert it field by field. */
  body: any;
  text: string;
}

/** The real Express app over HTTP on an ephemeral port, against its own fresh database. */
export async function startTestApi(envOverrides: Record<string, string> = {}): Promise<TestApi> {
  const db = await createTestDatabase();
  const orm = await initOrm({ url: db.url, poolMax: 5 });
  const fixture = await seedRoles(orm.em.fork());
  const s3Dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-s3-'));
  let fake = await startS3Fake({ port: 0, directory: s3Dir, bucket: 'earmark-captures' });
  const s3Port = Number(new URL(fake.endpoint).port);
  const env = loadApiEnv({
    EARMARK_DATABASE_URL: db.url,
    EARMARK_S3_ENDPOINT: fake.endpoint,
    EARMARK_JWT_SECRET: TEST_JWT_SECRET,
    EARMARK_WEB_DIST: '/nonexistent',
    EARMARK_LOGIN_RATE_LIMIT: '1000',
    // Test files sign in hundreds of times a minute from one address; the limits have their own tests (sign-in-limits.test.ts).
    EARMARK_LOGIN_RATE_LIMIT_PER_ADDRESS: '100000',
    EARMARK_LOGIN_RATE_LIMIT_PER_EMAIL: '100000',
    EARMARK_LOGIN_GLOBAL_PER_MINUTE: '100000',
    ...envOverrides,
  });
  const logLines: string[] = [];
  const sink = new Writable({ write(chunk, _enc, cb) { logLines.push(String(chunk)); cb(); } });
  const logger = pino({ level: 'info' }, sink);
  const runtime = await createApiRuntime(env, logger, { orm });
  const { objectStore, boss } = runtime;
  const { app, routes } = createApp(runtime);
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  const baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  const request: TestApi['request'] = async (method, path, opts = {}) => {
    const headers: Record<string, string> = { ...opts.headers };
    if (opts.token) headers.authorization = `Bearer ${opts.token}`;
    let body: string | undefined;
    if (opts.rawBody !== undefined) body = opts.rawBody;
    else if (opts.body !== undefined) body = JSON.stringify(opts.body);
    if (body !== undefined) headers['content-type'] ??= 'application/json';
    const res = await fetch(`${baseUrl}${path}`, { method, headers, body });
    const text = await res.text();
    const contentType = res.headers.get('content-type') ?? '';
    return { status: res.status, headers: res.headers, contentType, text, body: text && contentType.includes('json') ? JSON.parse(text) : null };
  };

  return {
    baseUrl,
    app,
    orm,
    objectStore,
    boss,
    runtime,
    s3: {
      get fake() {
        return fake;
      },
      directory: s3Dir,
      stop: () => fake.close(),
      async restart() {
        fake = await startS3Fake({ port: s3Port, directory: s3Dir, bucket: 'earmark-captures' });
      },
    },
    env,
    fixture,
    routes,
    logLines,
    request,
    async login(email, password = TEST_PASSWORD) {
      const res = await request('POST', '/api/auth/login', { body: { email, password } });
      if (res.status !== 200) throw new Error(`login ${email} failed: ${res.status} ${res.text}`);
      return res.body.accessToken as string;
    },
    async close() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await runtime.close();
      await fake.close().catch(() => {});
      fs.rmSync(s3Dir, { recursive: true, force: true });
      await db.drop();
    },
  };
}
