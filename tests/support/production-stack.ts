import { spawnSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { startS3Fake, startSmtpFake, type S3Fake, type SmtpFake } from '@earmark/infra/fakes';
import { ensureServerBuilt } from '@earmark/infra/build-js';
import pg from 'pg';
import { inject } from 'vitest';
import { startBuiltProcess, type BuiltProcess } from './built-process.js';
import { freePort, onFreePorts } from './free-port.js';
import type { Host } from './hosts.js';
import { startTcpRelays, type TcpRelay, type TcpRelays } from './tcp-relay.js';

const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

export interface ProductionServices {
  /** The application's database, reached as its own non-superuser role. */
  database: { name: string; role: string; appUrl: string; superuserUrl: string };
  s3: { endpoint: string; bucket: string };
  /** The relay's stand-in (SMTP fake with an inbox API). */
  smtp: { port: number; inboxUrl: string; messages(): Promise<Array<{ subject: string; to: Array<{ address: string }>; text: string }>> };
  /** A folder for this stack's env file and secret files (mode 0700). */
  dir: string;
  /** The variables every production process gets: through the env file, secrets through `_FILE`. */
  env: Record<string, string>;
  /**
   * Starts a built API, on loopback ports, or inside a simulated host (one API per host): then it
   * listens on the host's address and reaches the services through relays on the host's gateway.
   */
  startApi(name: string, extra?: Record<string, string>, host?: Host): Promise<BuiltProcess & { url: string; metricsUrl: string }>;
  startWorker(name: string, extra?: Record<string, string>, host?: Host): Promise<BuiltProcess & { metricsUrl: string }>;
  /** Connections the hosts' relays accepted, per service, by source address (empty without hosts). */
  relayedConnections(): Record<'database' | 'objectStore' | 'mail', Record<string, number>>;
  /** Queries as the superuser, for assertions (counts, leftovers). */
  query<T extends pg.QueryResultRow>(sql: string, params?: unknown[]): Promise<T[]>;
  close(): Promise<void>;
}

/**
 * What a team runs Earmark on, started the way an operator would, each piece separately: a
 * database and role made with infra/sql/create-app-role.sql (psql, as the superuser), an S3 store
 * (s3rver) with its own bucket, and an SMTP relay (the mail fake); then production processes from
 * the build (`EARMARK_MODE=production`, an env file, secrets from files). No demo seed anywhere.
 */
export async function startProductionServices(opts: { migrate?: boolean } = {}): Promise<ProductionServices> {
  await ensureServerBuilt(() => {});
  const suffix = randomBytes(4).toString('hex');
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-prod-'));
  const database = createAppDatabase(`earmark_p_${suffix}`, `earmark_app_${suffix}`, randomBytes(12).toString('base64url'));
  const s3Dir = path.join(dir, 's3');
  const bucket = `earmark-prod-${suffix}`;
  const s3: S3Fake = await startS3Fake({ port: 0, directory: s3Dir, bucket });
  const mail = await onFreePorts(2, async ([smtpPort, inboxPort]) => ({ smtpPort: smtpPort!, inboxPort: inboxPort!, fake: await startSmtpFake({ smtpPort: smtpPort!, webPort: inboxPort! }) }));
  const { smtpPort } = mail;
  const smtp: SmtpFake = mail.fake;

  const secret = (name: string, value: string) => {
    const file = path.join(dir, name);
    fs.writeFileSync(file, `${value}\n`, { mode: 0o600 });
    return file;
  };
  const envFile = path.join(dir, 'earmark.env');
  fs.writeFileSync(
    envFile,
    [
      '# Earmark production configuration (test stack)',
      'EARMARK_MODE=production',
      `EARMARK_S3_ENDPOINT=${s3.endpoint}`,
      `EARMARK_S3_BUCKET=${bucket}`,
      'EARMARK_S3_REGION=us-east-1',
      'EARMARK_S3_ACCESS_KEY=S3RVER',
      `EARMARK_MAIL_FROM="Earmark <earmark@prod.example.test>"`,
      'EARMARK_LOG_LEVEL=info',
      'EARMARK_LOG_FORMAT=json',
    ].join('\n'),
    { mode: 0o600 },
  );
  const env: Record<string, string> = {
    EARMARK_ENV_FILE: envFile,
    EARMARK_DATABASE_URL_FILE: secret('database-url', database.appUrl),
    EARMARK_JWT_SECRET_FILE: secret('jwt-secret', randomBytes(40).toString('base64url')),
    EARMARK_S3_SECRET_KEY_FILE: secret('s3-secret-key', 'S3RVER'),
    EARMARK_SMTP_URL_FILE: secret('smtp-url', `smtp://127.0.0.1:${smtpPort}`),
    AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true',
  };
  const processes: BuiltProcess[] = [];
  let relayProcess: Promise<TcpRelays> | undefined; // started with the first host
  const relays = new Map<string, Promise<HostRelays>>(); // by gateway address
  const started: HostRelays[] = [];
  const targets = { database: new URL(database.appUrl), objectStore: new URL(s3.endpoint), mail: new URL(`smtp://127.0.0.1:${smtpPort}`) };
  /** The variables that point a process in `host` at the relays on its gateway instead of 127.0.0.1. */
  const hostEnv = async (host: Host): Promise<Record<string, string>> => {
    relayProcess ??= startTcpRelays();
    const relayProcessNow = await relayProcess;
    if (!relays.has(host.gateway)) relays.set(host.gateway, startHostRelays(relayProcessNow, host.gateway, targets));
    const relayed = await relays.get(host.gateway)!;
    if (!started.includes(relayed)) started.push(relayed);
    const via = (url: URL, relay: TcpRelay) => Object.assign(new URL(url), { hostname: relay.host, port: String(relay.port) }).toString();
    return {
      EARMARK_DATABASE_URL_FILE: secret(`database-url-${host.namespace}`, via(targets.database, relayed.database)),
      EARMARK_SMTP_URL_FILE: secret(`smtp-url-${host.namespace}`, via(targets.mail, relayed.mail)),
      // The environment wins over the env file.
      EARMARK_S3_ENDPOINT: via(targets.objectStore, relayed.objectStore).replace(/\/$/, ''),
    };
  };
  const superuser = new pg.Pool({ connectionString: database.superuserUrl, max: 2 });

  const services: ProductionServices = {
    database,
    s3: { endpoint: s3.endpoint, bucket },
    smtp: {
      port: smtpPort,
      inboxUrl: smtp.inboxUrl,
      // The fake's REST inbox lives under /api (MailDev 3); /email is its web page.
      messages: async () => (await fetch(`${smtp.inboxUrl}api/email`)).json() as Promise<Array<{ subject: string; to: Array<{ address: string }>; text: string }>>,
    },
    dir,
    env,
    async startApi(name, extra = {}, host) {
      // A host's ports are all free (its own namespace): the same two on every host.
      const address = host?.address ?? '127.0.0.1';
      const port = host ? HOST_PORTS.api : await freePort();
      const metricsPort = host ? HOST_PORTS.apiMetrics : await freePort();
      const url = `http://${address}:${port}`;
      const proc = await startBuiltProcess({
        name,
        entry: 'api',
        env: {
          ...env,
          ...(host && { ...(await hostEnv(host)), EARMARK_API_HOST: address, EARMARK_METRICS_HOST: address }),
          EARMARK_API_PORT: String(port),
          EARMARK_PUBLIC_URL: extra.EARMARK_PUBLIC_URL ?? url,
          EARMARK_METRICS_PORT: String(metricsPort),
          EARMARK_INSTANCE_NAME: name,
          ...extra,
        },
        readyLine: 'api listening',
        timeoutMs: READY_TIMEOUT_MS,
        host,
      });
      processes.push(proc);
      return Object.assign(proc, { url, metricsUrl: `http://${address}:${metricsPort}` });
    },
    async startWorker(name, extra = {}, host) {
      const address = host?.address ?? '127.0.0.1';
      const metricsPort = host ? HOST_PORTS.workerMetrics : await freePort();
      const proc = await startBuiltProcess({
        name,
        entry: 'worker',
        env: {
          ...env,
          ...(host && { ...(await hostEnv(host)), EARMARK_METRICS_HOST: address }),
          EARMARK_PUBLIC_URL: 'http://127.0.0.1:1',
          EARMARK_METRICS_PORT: String(metricsPort),
          EARMARK_INSTANCE_NAME: name,
          EARMARK_ANALYSIS_SLOTS: '1',
          ...extra,
        },
        readyLine: 'worker ready',
        timeoutMs: READY_TIMEOUT_MS,
        host,
      });
      processes.push(proc);
      return Object.assign(proc, { metricsUrl: `http://${address}:${metricsPort}` });
    },
    relayedConnections() {
      const out = { database: {}, objectStore: {}, mail: {} } as Record<'database' | 'objectStore' | 'mail', Record<string, number>>;
      for (const r of started) for (const k of ['database', 'objectStore', 'mail'] as const) Object.assign(out[k], r[k].connectionsFrom());
      return out;
    },
    async query<T extends pg.QueryResultRow>(sql: string, params: unknown[] = []) {
      return (await superuser.query<T>(sql, params)).rows;
    },
    async close() {
      await Promise.all(processes.map((p) => p.stop()));
      await (await relayProcess?.catch(() => undefined))?.close();
      await superuser.end();
      await s3.close();
      await smtp.close().catch(() => {});
      dropAppDatabase(database.name, database.role);
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
  if (opts.migrate) {
    const { runBuilt } = await import('./built-process.js');
    const res = await runBuilt('admin', ['migrate'], env);
    if (res.code !== 0) throw new Error(`migrate failed:\n${res.output}`);
  }
  return services;
}

/**
 * Start-up of a built process is a few CPU-seconds (modules, a warmed analysis thread); three at
 * once on a shared 2-core machine took over 30 s, loopback or not, so allow more before failing.
 */
const READY_TIMEOUT_MS = 90_000;

/** Ports inside a simulated host, where nothing else listens. */
const HOST_PORTS = { api: 8080, apiMetrics: 9464, workerMetrics: 9465 } as const;

interface HostRelays {
  database: TcpRelay;
  objectStore: TcpRelay;
  mail: TcpRelay;
}

/**
 * The services listen on 127.0.0.1 only (the shared test PostgreSQL, the fakes): a process in a
 * simulated host reaches each through a relay on its gateway address (one relay process for all).
 */
async function startHostRelays(relays: TcpRelays, gateway: string, targets: Record<keyof HostRelays, URL>): Promise<HostRelays> {
  const relay = (url: URL) => relays.relay({ host: gateway }, { host: url.hostname, port: Number(url.port) });
  const [database, objectStore, mail] = await Promise.all([relay(targets.database), relay(targets.objectStore), relay(targets.mail)]);
  return { database: database!, objectStore: objectStore!, mail: mail! };
}

function psql(url: string, args: string[]): string {
  const res = spawnSync('psql', [url, '-v', 'ON_ERROR_STOP=1', '-X', '-q', ...args], { encoding: 'utf8' });
  if (res.status !== 0) throw new Error(`psql failed (${res.status}): ${res.stderr}`);
  return res.stdout;
}

/** The documented SQL (infra/sql/create-app-role.sql), run with psql as the superuser. */
function createAppDatabase(name: string, role: string, password: string) {
  const admin = inject('pgAdminUrl');
  psql(admin, ['-v', `role=${role}`, '-v', `password=${password}`, '-v', `database=${name}`, '-f', path.join(repoRoot, 'infra/sql/create-app-role.sql')]);
  const appUrl = new URL(admin);
  appUrl.username = role;
  appUrl.password = password;
  appUrl.pathname = `/${name}`;
  const superuserUrl = new URL(admin);
  superuserUrl.pathname = `/${name}`;
  return { name, role, appUrl: appUrl.toString(), superuserUrl: superuserUrl.toString() };
}

function dropAppDatabase(name: string, role: string): void {
  psql(inject('pgAdminUrl'), ['-c', `drop database if exists "${name}" with (force)`, '-c', `drop role if exists "${role}"`]);
}
