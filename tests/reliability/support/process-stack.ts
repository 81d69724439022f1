import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { ApiToken, initOrm, seedRoles, type RoleFixture } from '@earmark/db';
import { generateTokenSecret, ObjectStore } from '@earmark/platform';
import { startS3Fake, startSmtpFake, type S3Fake, type SmtpFake } from '@earmark/infra/fakes';
import type { MikroORM } from '@mikro-orm/postgresql';
import { freePort } from '../../support/free-port.js';
import { startWorkerProcess, type WorkerProcess } from '../../support/worker-process.js';
import { startTcpCut, type TcpCut } from './tcp-cut.js';

const apiDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../apps/api');

/** The JWT secret the API process signs with; the log scan asserts it never appears in output. */
export const STACK_JWT_SECRET = 'reliability-jwt-secret-0123456789-abcdefghij';

export interface ApiProcess {
  child: ChildProcess;
  output: string[];
  /** Resident set size of the API process now, in MiB (Linux /proc). */
  rssMiB(): number;
  /** Sends `signal` and resolves with the exit code once the process is gone. */
  signal(signal: NodeJS.Signals): Promise<number | null>;
}

export interface ProcessStack {
  url: string;
  orm: MikroORM;
  fixture: RoleFixture;
  /** A CI token of alpha-dsp with both scopes. */
  ciToken: string;
  /** A store client of the test's own (list and read what the API and worker wrote). */
  objectStore: ObjectStore;
  api: ApiProcess;
  /** Stops the API process (SIGTERM) and starts a fresh one on the same port. */
  restartApi(): Promise<ApiProcess>;
  /** Everything between the processes and PostgreSQL passes through here. */
  database: TcpCut;
  s3: { stop(): Promise<void>; restart(): Promise<void> };
  smtp: { port: number; inboxUrl: string; stop(): Promise<void>; restart(): Promise<void> };
  workerEnv: Record<string, string>;
  workers: WorkerProcess[];
  startWorker(extraEnv?: Record<string, string>): Promise<WorkerProcess>;
  /** SIGKILLs worker `index` (no clean-up, as a crash or an OOM kill) and starts a fresh one like it in its place. */
  crashWorker(index: number): Promise<void>;
  /** Every line any process of the stack wrote (API and workers), for the secret scan. */
  allOutput(): string;
  close(): Promise<void>;
}

export interface ProcessStackOptions {
  database: { url: string; drop(): Promise<void> };
  apiEnv?: Record<string, string>;
}

/**
 * The whole product as separate processes on loopback: the API (`apps/api/src/server.ts`, the
 * same entry point production runs), real workers, the S3 and SMTP fakes, and PostgreSQL behind
 * a TCP pass-through that can simulate a restart. Unlike tests/support/stack.ts (API in-process)
 * this lets a test signal the API, read its memory and capture its log output.
 */
export async function startProcessStack(opts: ProcessStackOptions): Promise<ProcessStack> {
  const dbUrl = new URL(opts.database.url);
  const database = await startTcpCut({ host: dbUrl.hostname, port: Number(dbUrl.port) });
  const proxiedUrl = new URL(opts.database.url);
  proxiedUrl.port = String(database.port);
  const orm = await initOrm({ url: opts.database.url, poolMax: 6 });
  const fixture = await seedRoles(orm.em.fork());
  const secret = generateTokenSecret();
  const em = orm.em.fork();
  em.create(ApiToken, { project: fixture.project.id, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: fixture.users.admin.id });
  await em.flush();

  const s3Dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-reliability-s3-'));
  let s3: S3Fake = await startS3Fake({ port: 0, directory: s3Dir, bucket: 'earmark-captures' });
  const s3Port = Number(new URL(s3.endpoint).port);
  const smtpPort = await freePort();
  const inboxPort = await freePort();
  let smtp: SmtpFake | null = await startSmtpFake({ smtpPort, webPort: inboxPort });
  const apiPort = await freePort();
  const url = `http://127.0.0.1:${apiPort}`;
  const objectStore = new ObjectStore({ endpoint: s3.endpoint, bucket: 'earmark-captures', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' });

  const apiEnv = {
    EARMARK_DATABASE_URL: proxiedUrl.toString(),
    EARMARK_JWT_SECRET: STACK_JWT_SECRET,
    EARMARK_S3_ENDPOINT: s3.endpoint,
    EARMARK_API_PORT: String(apiPort),
    EARMARK_PUBLIC_URL: url,
    EARMARK_WEB_DIST: '/nonexistent',
    EARMARK_LOG_LEVEL: 'info',
    ...opts.apiEnv,
  };
  const finishedOutput: string[] = [];
  let api = await startApiProcess(apiEnv, url);

  const workerEnv = {
    EARMARK_DATABASE_URL: proxiedUrl.toString(),
    EARMARK_S3_ENDPOINT: s3.endpoint,
    EARMARK_SMTP_PORT: String(smtpPort),
    EARMARK_PUBLIC_URL: url,
    EARMARK_SWEEP_INTERVAL_S: '1',
    EARMARK_JOB_RETRY_DELAY_S: '1',
    EARMARK_JOB_MAINTENANCE_S: '1',
    EARMARK_ANALYSIS_EXPIRE_S: '8',
  };
  const workers: WorkerProcess[] = [];
  const workerExtras: Record<string, string>[] = [];
  return {
    url,
    orm,
    fixture,
    ciToken: secret.token,
    objectStore,
    get api() {
      return api;
    },
    async restartApi() {
      await api.signal('SIGTERM');
      finishedOutput.push(...api.output);
      api = await startApiProcess(apiEnv, url);
      return api;
    },
    database,
    s3: {
      stop: () => s3.close(),
      async restart() {
        s3 = await startS3Fake({ port: s3Port, directory: s3Dir, bucket: 'earmark-captures' });
      },
    },
    smtp: {
      port: smtpPort,
      inboxUrl: `http://127.0.0.1:${inboxPort}/`,
      async stop() {
        await smtp?.close();
        smtp = null;
      },
      async restart() {
        smtp = await startSmtpFake({ smtpPort, webPort: inboxPort });
      },
    },
    workerEnv,
    workers,
    async startWorker(extraEnv = {}) {
      const worker = await startWorkerProcess({ ...workerEnv, ...extraEnv });
      workers.push(worker);
      workerExtras.push(extraEnv);
      return worker;
    },
    async crashWorker(index) {
      await workers[index]!.kill();
      finishedOutput.push(...workers[index]!.output);
      workers[index] = await startWorkerProcess({ ...workerEnv, ...workerExtras[index] });
    },
    allOutput: () => [...finishedOutput, ...api.output, ...workers.flatMap((w) => w.output)].join(''),
    async close() {
      await Promise.all(workers.map((w) => w.stop()));
      await api.signal('SIGTERM');
      objectStore.destroy();
      await orm.close();
      await s3.close().catch(() => {});
      await smtp?.close().catch(() => {});
      await database.close();
      fs.rmSync(s3Dir, { recursive: true, force: true });
      await opts.database.drop();
    },
  };
}

async function startApiProcess(env: Record<string, string>, url: string): Promise<ApiProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'src/server.ts'], {
    cwd: apiDir,
    env: { ...process.env, AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const output: string[] = [];
  child.stdout!.on('data', (c: Buffer) => output.push(c.toString()));
  child.stderr!.on('data', (c: Buffer) => output.push(c.toString()));
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the API process exited with ${child.exitCode}:\n${output.join('')}`);
    const up = await fetch(`${url}/api/health`).then((r) => r.ok, () => false);
    if (up) break;
    if (Date.now() > deadline) {
      child.kill('SIGKILL');
      throw new Error(`the API process did not answer /api/health within 60 s:\n${output.join('')}`);
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  return {
    child,
    output,
    rssMiB() {
      const status = fs.readFileSync(`/proc/${child.pid}/status`, 'utf8');
      const kb = Number(/VmRSS:\s+(\d+)/.exec(status)?.[1] ?? Number.NaN);
      return Math.round(kb / 1024);
    },
    async signal(signal) {
      if (child.exitCode === null && child.signalCode === null) child.kill(signal);
      const timer = setTimeout(() => child.kill('SIGKILL'), 20_000);
      const code = await exited;
      clearTimeout(timer);
      return code;
    },
  };
}
