import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { StimulusSpec, type CreatedApiToken, type MaskCheckInput, type MaskRevisionDto, type Session } from '@earmark/contracts';
import { ensureWebBuilt } from '@earmark/infra/web-build';
import { DEMO_PASSWORD, TEST_PASSWORD, demoProjects, demoUsers } from '@earmark/db';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { scaleDb } from '@earmark/dsp/testing';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runBuilt, startBuiltProcess, type BuiltProcess } from '../support/built-process.js';
import { freePort } from '../support/free-port.js';
import { startProductionServices, type ProductionServices } from '../support/production-stack.js';
import { waitFor } from '../support/wait-for.js';

/**
 * Issue 13's first must-show: Earmark installed the way an operator would, from the build, in
 * production mode, on a database, object store and mail relay started on their own — no demo
 * anything. It refuses to start until migrated or when configured wrongly (without echoing a
 * secret), the admin command migrates and makes the first administrator, and then a team works
 * through HTTP and the built CLI only: project, target, test case, a mask approved by a second
 * person, a CI token, a passing and a failing build, the failure mail through the relay.
 */

const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const PUBLIC_URL = 'https://earmark.prod.example.test';
const PROJECT = 'osprey-amp';
const CASE = 'level.tone.1k';
const TARGET = 'rev-b';
const PASS_SHA = 'a1b2c3d4e5f60718293a4b5c6d7e8f9012345678';
const FAIL_SHA = 'f0e1d2c3b4a5968778695a4b3c2d1e0f98765432';
const ADMIN = { email: 'ops.lead@osprey.example.test', name: 'Runa Vestergaard', password: 'first-admin-pass-7319' };
const QA = { email: 'qa.lead@osprey.example.test', name: 'Jonas Aaltonen', password: 'qa-lead-pass-5521' };

const FS = 48000;
const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: FS, seconds: 1, levelDbfs: -20, frequency: 1000 });
const played = Float64Array.from(generateStimulus(spec).channels[0]!, Math.fround);
/** The tone measures −20 dBFS (full-scale sine reference); the failing capture is 20 dB down. */
const mask: MaskCheckInput[] = [{ id: 'level', kind: 'level', metric: 'rms-dbfs', min: -23, max: -17 }];

/** The migrations this build knows, in order, as the migrator names them. */
const knownMigrations = [...fs.readFileSync(path.join(repoRoot, 'packages/db/src/migrations/index.ts'), 'utf8').matchAll(/name: '(migration-\d+)'/g)].map((m) => m[1]!);

let services: ProductionServices;
let api: BuiltProcess & { url: string; metricsUrl: string };
let worker: BuiltProcess & { metricsUrl: string };
/** Every output of every production process and command this file ran, for the leak checks. */
const outputs: Array<{ what: string; text: string }> = [];
const secrets: Record<string, string> = {};
let ciToken = '';
let adminToken = '';

const readSecret = (fileVar: string) => fs.readFileSync(services.env[fileVar]!, 'utf8').trim();

async function admin(args: string[], stdin?: string) {
  const res = await runBuilt('admin', args, services.env, stdin);
  outputs.push({ what: `admin ${args.join(' ')}`, text: res.output });
  return res;
}

/**
 * Starts the built API with exactly this environment and expects it to refuse: resolves with its
 * exit code and output (a process that comes up instead is stopped and fails the test).
 */
async function apiRefusal(what: string, env: Record<string, string>): Promise<{ code: number | null; output: string }> {
  const proc = await startBuiltProcess({ name: what, entry: 'api', env: { ...env, EARMARK_API_PORT: String(await freePort()), EARMARK_METRICS_PORT: String(await freePort()) } });
  const timer = setTimeout(() => void proc.stop(), 30_000);
  const code = await proc.exited;
  clearTimeout(timer);
  outputs.push({ what, text: proc.output() });
  expect(proc.output(), `${what}: the API started instead of refusing`).not.toContain('api listening');
  return { code, output: proc.output() };
}

async function call<T = any>(method: string, urlPath: string, opts: { token?: string; body?: unknown } = {}): Promise<{ status: number; text: string; body: T }> {
  const headers: Record<string, string> = {};
  if (opts.token) headers.authorization = `Bearer ${opts.token}`;
  if (opts.body !== undefined) headers['content-type'] = 'application/json';
  const res = await fetch(`${api.url}${urlPath}`, { method, headers, body: opts.body === undefined ? undefined : JSON.stringify(opts.body) });
  const text = await res.text();
  return { status: res.status, text, body: (text.startsWith('{') ? JSON.parse(text) : null) as T };
}

async function signIn(email: string, password: string): Promise<string> {
  const res = await call<Session>('POST', '/api/auth/login', { body: { email, password } });
  expect(res.status, res.text).toBe(200);
  return res.body.accessToken;
}

function writeCapture(name: string, gainDb: number): string {
  const file = path.join(services.dir, name);
  fs.writeFileSync(file, encodeWav([scaleDb(played, gainDb)], FS, { encoding: 'float', bitsPerSample: 32 }));
  return file;
}

async function submit(file: string, sha: string) {
  const args = ['submit', file, '--project', PROJECT, '--sha', sha, '--case', CASE, '--target', TARGET, '--wait', '--timeout', '60'];
  const res = await runBuilt('cli', args, { EARMARK_URL: api.url, EARMARK_TOKEN: ciToken });
  outputs.push({ what: `cli submit ${sha}`, text: res.output });
  return res;
}

const count = async (table: string) => (await services.query<{ n: number }>(`select count(*)::int as n from ${table}`))[0]!.n;
const processOutput = () => [api, worker].filter(Boolean).map((p) => `--- ${p.name}:\n${p.output().slice(-3000)}`).join('\n');

beforeAll(async () => {
  ensureWebBuilt(() => {}); // what `npm run build` makes; rebuilt here only when a source is newer
  services = await startProductionServices();
  secrets.databasePassword = decodeURIComponent(new URL(services.database.appUrl).password);
  secrets.jwtSecret = readSecret('EARMARK_JWT_SECRET_FILE');
}, 120_000);

afterAll(async () => {
  await services?.close();
}, 60_000);

describe('production mode, installed as an operator would', () => {
  it('refuses to start before the migrations, naming them and the command that applies them', async () => {
    const env = { ...services.env, EARMARK_PUBLIC_URL: PUBLIC_URL };
    const refused = await apiRefusal('api before migrate', env);
    expect(refused.code, refused.output).toBe(1);
    expect(refused.output).toContain('earmark api: cannot start:');
    expect(refused.output).toContain(`${knownMigrations.length} migration(s) pending`);
    for (const name of knownMigrations) expect(refused.output).toContain(name);
    expect(refused.output).toContain('npm run admin -- migrate');

    const check = await admin(['migrate', '--check']);
    expect(check.code, check.output).toBe(1);
    expect(check.output).toContain(`pending: ${knownMigrations.join(', ')}`);
  });

  it('refuses a wrong or missing setting with a message naming it, never echoing a secret', async () => {
    const withoutPublicUrl = { ...services.env };
    const [badEndpoint, noPublicUrl, shortJwt] = await Promise.all([
      apiRefusal('api with a bad S3 endpoint', { ...services.env, EARMARK_PUBLIC_URL: PUBLIC_URL, EARMARK_S3_ENDPOINT: 'not-a-url' }),
      apiRefusal('api without a public URL', withoutPublicUrl),
      // A secret that is wrong is named, its value is not shown.
      apiRefusal('api with a short JWT secret', { ...services.env, EARMARK_PUBLIC_URL: PUBLIC_URL, EARMARK_JWT_SECRET_FILE: secretFile('short-jwt', 'too-short-9f2k') }),
    ]);
    for (const r of [badEndpoint, noPublicUrl, shortJwt]) {
      expect(r.code, r.output).toBe(1);
      expect(r.output).toContain('earmark api: cannot start: Invalid API configuration (production mode: no development defaults)');
    }
    expect(badEndpoint.output).toMatch(/EARMARK_S3_ENDPOINT: .*\(got "not-a-url"\)/);
    expect(noPublicUrl.output).toMatch(/EARMARK_PUBLIC_URL: required \(not set\)/);
    expect(shortJwt.output).toMatch(/EARMARK_JWT_SECRET: must be at least 32 characters \(value hidden: a secret\)/);
    expect(shortJwt.output).not.toContain('too-short-9f2k');
    // Each names only what is wrong: the configuration around it is fine.
    expect(badEndpoint.output).not.toContain('EARMARK_PUBLIC_URL');
    expect(noPublicUrl.output).not.toContain('EARMARK_S3_ENDPOINT');
  });

  it('migrates with the admin command, as a role that is no superuser and owns what it made', async () => {
    const migrated = await admin(['migrate']);
    expect(migrated.code, migrated.output).toBe(0);
    expect(migrated.output).toContain(`applied ${knownMigrations.length} migration(s): ${knownMigrations.join(', ')}`);
    expect(migrated.output, 'colour codes in output that is no terminal').not.toContain('\u001b[');
    const check = await admin(['migrate', '--check']);
    expect(check.code, check.output).toBe(0);
    expect(check.output).toContain('the database is up to date');
    const again = await admin(['migrate']);
    expect(again.code, again.output).toBe(0);
    expect(again.output).toContain('nothing to apply');

    const app = new pg.Client({ connectionString: services.database.appUrl });
    await app.connect();
    try {
      const { rows } = await app.query<{ rolsuper: boolean; rolcreatedb: boolean; rolcreaterole: boolean }>('select rolsuper, rolcreatedb, rolcreaterole from pg_roles where rolname = current_user');
      expect(rows).toEqual([{ rolsuper: false, rolcreatedb: false, rolcreaterole: false }]);
    } finally {
      await app.end();
    }
    const owners = await services.query<{ tableowner: string; n: number }>("select tableowner, count(*)::int as n from pg_tables where schemaname = 'public' group by tableowner");
    expect(owners).toEqual([{ tableowner: services.database.role, n: expect.any(Number) }]);
    const tables = (await services.query<{ tablename: string }>("select tablename from pg_tables where schemaname = 'public'")).map((t) => t.tablename);
    expect(tables).toEqual(expect.arrayContaining(['app_user', 'project', 'capture', 'verdict', 'notification']));
  });

  it('creates the first administrator from stdin once, and refuses a second', async () => {
    const created = await admin(['create-admin', '--email', ADMIN.email, '--name', ADMIN.name], `${ADMIN.password}\n`);
    expect(created.code, created.output).toBe(0);
    expect(created.output).toContain(`created administrator ${ADMIN.email}`);
    const second = await admin(['create-admin', '--email', 'someone.else@osprey.example.test', '--name', 'Someone Else'], 'another-admin-pass-1\n');
    expect(second.code, second.output).toBe(1);
    expect(second.output).toContain('an administrator exists already');
    expect(await services.query('select email, display_name, is_admin from app_user')).toEqual([{ email: ADMIN.email, display_name: ADMIN.name, is_admin: true }]);
  });

  it('starts the API and a worker from the build; the job queue is the role’s too', async () => {
    [api, worker] = await Promise.all([services.startApi('api-1', { EARMARK_PUBLIC_URL: PUBLIC_URL }), services.startWorker('worker-1', { EARMARK_PUBLIC_URL: PUBLIC_URL })]);
    for (const p of [api, worker]) expect(p.logLines().find((l) => l.msg === 'api listening' || l.msg === 'worker ready')).toMatchObject({ mode: 'production', instance: p.name });
    const [schema] = await services.query<{ owner: string }>("select nspowner::regrole::text as owner from pg_namespace where nspname = 'pgboss'");
    expect(schema).toEqual({ owner: services.database.role });
    const strangers = await services.query("select schemaname, tablename, tableowner from pg_tables where schemaname in ('public', 'pgboss') and tableowner <> $1", [services.database.role]);
    expect(strangers).toEqual([]);
  });

  it('lets a team set up a project through HTTP: target, test case, a mask approved by a second person, a CI token', async () => {
    adminToken = await signIn(ADMIN.email, ADMIN.password);
    const project = await call('POST', '/api/projects', { token: adminToken, body: { key: PROJECT, name: 'Osprey amplifier' } });
    expect(project.status, project.text).toBe(201);
    const target = await call('POST', `/api/projects/${PROJECT}/targets`, { token: adminToken, body: { key: TARGET, name: 'Rev B board', sampleRate: FS } });
    expect(target.status, target.text).toBe(201);
    const testCase = await call('POST', `/api/projects/${PROJECT}/test-cases`, { token: adminToken, body: { key: CASE, name: '1 kHz line level', stimulus: spec } });
    expect(testCase.status, testCase.text).toBe(201);

    const masks = `/api/projects/${PROJECT}/test-cases/${CASE}/masks`;
    const draft = await call<MaskRevisionDto>('POST', masks, { token: adminToken, body: { target: TARGET, checks: mask, note: 'Line level within 3 dB' } });
    expect(draft.status, draft.text).toBe(201);
    const revision = draft.body.revision;
    const submitted = await call<MaskRevisionDto>('POST', `${masks}/${revision}/submit`, { token: adminToken });
    expect([submitted.status, submitted.body.state], submitted.text).toEqual([200, 'in_review']);
    // Four eyes: the author may not approve their own revision, even as an administrator.
    const selfApproved = await call('POST', `${masks}/${revision}/approve`, { token: adminToken, body: {} });
    expect(selfApproved.status, selfApproved.text).toBe(403);

    const qaUser = await call('POST', '/api/admin/users', { token: adminToken, body: { email: QA.email, displayName: QA.name, password: QA.password } });
    expect(qaUser.status, qaUser.text).toBe(201);
    const member = await call('PUT', `/api/projects/${PROJECT}/members`, { token: adminToken, body: { email: QA.email, role: 'qa_manager' } });
    expect(member.status, member.text).toBe(200);
    const qaToken = await signIn(QA.email, QA.password);
    const approved = await call<MaskRevisionDto>('POST', `${masks}/${revision}/approve`, { token: qaToken, body: { comment: 'Agreed on the bench.' } });
    expect([approved.status, approved.body.state], approved.text).toEqual([200, 'approved']);

    const token = await call<CreatedApiToken>('POST', `/api/projects/${PROJECT}/tokens`, { token: adminToken, body: { name: 'ci pipeline' } });
    expect(token.status, token.text).toBe(201);
    ciToken = token.body.secret;
    expect(ciToken).toMatch(/^em_/);
    secrets.ciToken = ciToken;
  });

  it('gates builds through the built CLI: a pass exits 0, a failure exits 1 and its mail reaches the relay', async () => {
    const passed = await submit(writeCapture('pass.wav', 0), PASS_SHA);
    expect(passed.code, `${passed.output}\n${processOutput()}`).toBe(0);
    expect(passed.output).toMatch(new RegExp(`^PASS\\s+${CASE.replace('.', '\\.')}\\s+${TARGET}\\s+pass\\.wav`, 'm'));

    const failed = await submit(writeCapture('fail.wav', -20), FAIL_SHA);
    expect(failed.code, `${failed.output}\n${processOutput()}`).toBe(1);
    expect(failed.output).toMatch(/^FAIL\s+.*fail\.wav\s+level/m);

    const verdicts = await services.query<{ sha: string; outcome: string; n: number }>(
      'select b.sha, v.outcome, count(*)::int as n from verdict v join capture c on c.id = v.capture_id join build b on b.id = c.build_id group by b.sha, v.outcome order by b.sha',
    );
    expect(verdicts).toEqual([
      { sha: PASS_SHA, outcome: 'pass', n: 1 },
      { sha: FAIL_SHA, outcome: 'fail', n: 1 },
    ].sort((a, b) => a.sha.localeCompare(b.sha)));

    const mail = await waitFor(
      async () => (await services.smtp.messages()).find((m) => m.subject.includes(`build ${FAIL_SHA.slice(0, 10)} failed`)),
      { what: 'the build-failure mail at the relay', timeoutMs: 30_000, intervalMs: 200, context: processOutput },
    );
    expect(mail.subject).toBe(`[Earmark] ${PROJECT} build ${FAIL_SHA.slice(0, 10)} failed: 1 failing cell`);
    expect(mail.to.map((t) => t.address)).toEqual([QA.email]);
    expect(mail.text).toContain(`${PUBLIC_URL}/projects/${PROJECT}/builds/${FAIL_SHA}`);
    const messages = await services.smtp.messages();
    expect(messages.filter((m) => m.subject.includes(PASS_SHA.slice(0, 10)))).toEqual([]);
  });

  it('answers on each process’s metrics port: the listed series, moved by the run, and ready probes', async () => {
    /** `name{labels} value` lines of the Prometheus text format, as [series, value]. */
    const scrape = async (url: string) => {
      const res = await fetch(`${url}/metrics`);
      expect(res.status).toBe(200);
      expect(res.headers.get('content-type')).toMatch(/^text\/plain; version=0\.0\.4/);
      return (await res.text()).split('\n').filter((l) => l && !l.startsWith('#')).map((l) => [l.slice(0, l.lastIndexOf(' ')), Number(l.slice(l.lastIndexOf(' ') + 1))] as const);
    };
    const value = (series: ReadonlyArray<readonly [string, number]>, name: string, labels: Record<string, string> = {}) =>
      series.filter(([k]) => k.startsWith(`${name}{`) || k === name).filter(([k]) => Object.entries(labels).every(([l, v]) => k.includes(`${l}="${v}"`))).reduce((sum, [, v]) => sum + v, 0);

    // Counters are compared with the database once the outbox is drained.
    await waitFor(async () => (await services.query<{ n: number }>(`select count(*)::int as n from notification where state = 'pending'`))[0]!.n === 0, { what: 'an empty outbox', timeoutMs: 30_000, intervalMs: 200 });
    const apiSeries = await scrape(api.metricsUrl);
    const uploadRoute = { route: '/api/v1/projects/:project/builds/:sha/captures', method: 'POST', status: '202' };
    expect(value(apiSeries, 'earmark_http_requests_total', uploadRoute)).toBe(2);
    expect(value(apiSeries, 'earmark_capture_uploads_total', { outcome: 'accepted' })).toBe(2);
    const captureBytes = (await services.query<{ n: string }>('select sum(size_bytes)::text as n from capture'))[0]!.n;
    expect(value(apiSeries, 'earmark_capture_upload_bytes_total')).toBe(Number(captureBytes));
    expect(apiSeries.some(([k]) => k.startsWith('earmark_http_request_duration_seconds_bucket{'))).toBe(true);
    // Every series names its process and instance (EARMARK_INSTANCE_NAME), so several processes sum correctly.
    expect(apiSeries.filter(([k]) => !(k.includes('process="api"') && k.includes('instance="api-1"')))).toEqual([]);

    const workerSeries = await scrape(worker.metricsUrl);
    expect(value(workerSeries, 'earmark_verdicts_total', { outcome: 'pass' })).toBe(1);
    expect(value(workerSeries, 'earmark_verdicts_total', { outcome: 'fail' })).toBe(1);
    expect(value(workerSeries, 'earmark_analysis_duration_seconds_count')).toBe(2);
    expect(value(workerSeries, 'earmark_jobs_total', { queue: 'analyze-capture', result: 'completed' })).toBe(2);
    const sentMail = (await services.query<{ n: number }>(`select count(*)::int as n from notification where state = 'sent'`))[0]!.n;
    expect(sentMail).toBeGreaterThanOrEqual(1); // the failed build's mail, and the review request to the QA manager
    expect(value(workerSeries, 'earmark_mails_sent_total', { result: 'sent' })).toBe(sentMail);
    // Read from the database at scrape time: the queue is drained, the outbox empty.
    expect(value(workerSeries, 'earmark_queue_depth', { queue: 'analyze-capture', state: 'created' })).toBe(0);
    expect(workerSeries.some(([k]) => k.startsWith('earmark_queue_oldest_age_seconds{'))).toBe(true);
    expect(value(workerSeries, 'earmark_mail_outbox_depth', { status: 'pending' })).toBe(0);

    for (const url of [api.metricsUrl, worker.metricsUrl]) {
      expect((await fetch(`${url}/livez`)).status).toBe(200);
      const ready = await fetch(`${url}/readyz`);
      expect(ready.status).toBe(200);
      expect(await ready.json()).toMatchObject({ ready: true, checks: { database: 'ok', queue: 'ok', objectStore: 'ok' } });
    }
    const apiReady = await fetch(`${api.url}/api/health/ready`);
    expect(apiReady.status).toBe(200);
  });

  it('holds no demo data: exactly the users, project and token made here, no demo names, no secret in any output', async () => {
    expect({ users: await count('app_user'), projects: await count('project'), members: await count('membership'), tokens: await count('api_token'), builds: await count('build') }).toEqual({
      users: 2,
      projects: 1,
      members: 1,
      tokens: 1,
      builds: 2,
    });
    expect((await services.query<{ email: string }>('select email from app_user order by email')).map((u) => u.email)).toEqual([ADMIN.email, QA.email].sort());

    // The demo's company, people and projects, straight from the seeder.
    const demoWords = ['fernwick', ...demoUsers.flatMap((u) => [u.email, u.displayName]), ...demoProjects.flatMap((p) => [p.key, p.name])];
    const dump = (await services.query<{ row: string }>(
      `select row_to_json(t)::text as row from (
         select email, display_name as name from app_user
         union all select key, name from project
         union all select key, name from target
         union all select key, name from test_case
         union all select name, prefix from api_token) t`,
    )).map((r) => r.row).join('\n').toLowerCase();
    for (const word of demoWords) expect(dump, `demo name "${word}" in the database`).not.toContain(word.toLowerCase());

    outputs.push({ what: api.name, text: api.output() }, { what: worker.name, text: worker.output() });
    expect(outputs.length).toBeGreaterThanOrEqual(12);
    const forbidden = { ...secrets, demoPassword: DEMO_PASSWORD, testPassword: TEST_PASSWORD, adminPassword: ADMIN.password, qaPassword: QA.password };
    for (const { what, text } of outputs) {
      for (const [name, value] of Object.entries(forbidden)) expect(text.includes(value), `${name} in the output of ${what}`).toBe(false);
      expect(text, `something like a CI token in the output of ${what}`).not.toMatch(/em_[A-Za-z0-9]{6,}_[A-Za-z0-9_-]{20,}/);
      for (const word of demoWords) expect(text.toLowerCase(), `demo name "${word}" in the output of ${what}`).not.toContain(word.toLowerCase());
    }
  });

  it('serves the web app from its built files', async () => {
    const builtIndex = fs.readFileSync(path.join(repoRoot, 'apps/web/dist/index.html'), 'utf8');
    const res = await fetch(`${api.url}/`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/^text\/html/);
    const html = await res.text();
    expect(html).toBe(builtIndex);
    const script = /<script[^>]+src="([^"]+\.js)"/.exec(html)?.[1];
    expect(script, html).toMatch(/^\/assets\/.+\.js$/);
    const asset = await fetch(`${api.url}${script}`);
    expect(asset.status).toBe(200);
    expect(asset.headers.get('content-type')).toMatch(/^(application|text)\/javascript/);
    expect((await asset.text()).length).toBeGreaterThan(1000);
    // A client-side route of the dashboard gets the same page.
    const deepLink = await fetch(`${api.url}/projects/${PROJECT}/builds/${FAIL_SHA}`);
    expect([deepLink.status, await deepLink.text()]).toEqual([200, builtIndex]);
  });
});

function secretFile(name: string, value: string): string {
  const file = path.join(services.dir, name);
  fs.writeFileSync(file, `${value}\n`, { mode: 0o600 });
  return file;
}
