import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { QUEUES, StimulusSpec, type CaptureDto, type CapturePlot, type DeriveMaskResponse, type ImpactRunDto, type MaskCheckInput, type Session } from '@earmark/contracts';
import { ApiToken, MaskRevision, TEST_PASSWORD, Target, TestCase, initOrm, seedRoles, testCaseSettings } from '@earmark/db';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { scaleDb } from '@earmark/dsp/testing';
import { ObjectStore, generateTokenSecret } from '@earmark/platform';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BuiltProcess } from '../support/built-process.js';
import { createHosts, hostsSupport, type Host, type Hosts } from '../support/hosts.js';
import { startProductionServices, type ProductionServices } from '../support/production-stack.js';
import { waitFor } from '../support/wait-for.js';

/**
 * Scale-out (issue 13): the built production processes on one database, one object store and
 * one relay. Each process runs on its own simulated host (a network namespace, tests/support/hosts.ts)
 * when the machine allows it, else on loopback ports; the figures say which. Phase 1 is one API and one worker; phase 2 is two APIs and three workers, one of
 * them SIGKILLed a third of the way through. It checks that every capture is judged exactly
 * once, that mail, jobs and sign-in state are shared rather than per process, and records the
 * throughput and latency of both phases in `${os.tmpdir()}/earmark-scale-out.json`. On a small
 * machine phase 2 need not be faster, so no speed-up is asserted.
 */
type Api = BuiltProcess & { url: string };
type Worker = BuiltProcess;

const FS = 48000;
const CASE = 'level.sweep';
const MASKS = `/api/projects/alpha-dsp/test-cases/${CASE}/masks`;
const SUBSCRIBERS = ['engineer@example.test', 'qa_manager@example.test'];
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 0.5, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.1, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const played = Float64Array.from(generateStimulus(spec).channels[0]!, Math.fround);
const levelMask = (min: number, max: number): MaskCheckInput[] => [{ id: 'level', kind: 'level', metric: 'rms-dbfs', min, max }];
/** A failing capture: 20 dB down, far below revision 1's floor (−22 dBFS) and above revision 2's (−45). */
const FAIL_GAIN_DB = -20;

/** Short expiry and fast maintenance, so a killed worker's job comes back within seconds. */
const WORKER_ENV = { EARMARK_ANALYSIS_EXPIRE_S: '5', EARMARK_JOB_RETRY_DELAY_S: '1', EARMARK_JOB_MAINTENANCE_S: '1', EARMARK_SWEEP_INTERVAL_S: '1' };
const LOGIN_LIMIT = 4;
const API_ENV = { EARMARK_LOGIN_RATE_LIMIT: String(LOGIN_LIMIT) };

interface PlannedCapture {
  sha: string;
  fails: boolean;
  idempotencyKey: string;
  wav: Buffer<ArrayBuffer>;
}

/**
 * `builds` builds of `perBuild` captures; every capture of a failing build fails, so whichever of
 * them is a build's newest fails too. Every WAV differs (gain steps of 0.001 dB).
 */
function planCaptures(prefix: string, builds: number, perBuild: number, failingBuilds: number[]): PlannedCapture[] {
  const plan: PlannedCapture[] = [];
  for (let b = 0; b < builds; b++) {
    const sha = `${prefix}${String(b + 1).padStart(6, '0')}`;
    for (let i = 0; i < perBuild; i++) {
      const fails = failingBuilds.includes(b);
      const gainDb = (fails ? FAIL_GAIN_DB : 0) + (b * perBuild + i) * 0.001;
      plan.push({ sha, fails, idempotencyKey: `scale-out-${sha}-${i}`, wav: Buffer.from(encodeWav([scaleDb(played, gainDb)], FS, { encoding: 'float', bitsPerSample: 32 })) });
    }
  }
  return plan;
}

const failingShas = (plan: PlannedCapture[]) => [...new Set(plan.filter((c) => c.fails).map((c) => c.sha))].sort();
const passingShas = (plan: PlannedCapture[]) => [...new Set(plan.map((c) => c.sha))].filter((sha) => !failingShas(plan).includes(sha)).sort();

let services: ProductionServices;
let store: ObjectStore;
let ciToken = '';
let apiA: Api;
let apiB: Api;
const workers: Worker[] = [];
const phase1 = planCaptures('a1', 6, 5, [1, 4]);
// Phase 2's failing builds come after the kill (a third of the way): mail delivery across a crash is
// at least once. The sender marks each message sent right after the relay accepts it, so a worker
// SIGKILLed in the middle of a send repeats that one message (same Message-ID; the outbox test in
// apps/worker shows it). What this test holds the workers to is no duplicate from running side by side.
const phase2 = planCaptures('b2', 12, 5, [6, 8, 10]);
const accepted = new Map<string, CaptureDto>(); // idempotency key → the capture its first upload made
const uploadStats = { retried503: 0 };
const figures: Record<string, unknown> = { machine: { cpus: os.availableParallelism(), node: process.version, platform: `${os.type()} ${os.release()}` } };

const PROCESSES = ['api-a', 'worker-1', 'api-b', 'worker-2', 'worker-3'] as const;
const hostSupport = hostsSupport();
let hosts: Hosts | undefined;
/** The simulated host a process runs on, or undefined on loopback ports. */
const hostOf = (name: (typeof PROCESSES)[number]): Host | undefined => hosts?.host(name);

async function call(api: Api, method: string, urlPath: string, opts: { token?: string; body?: unknown } = {}) {
  const headers: Record<string, string> = {};
  if (opts.token) headers.authorization = `Bearer ${opts.token}`;
  if (opts.body !== undefined) headers['content-type'] = 'application/json';
  const res = await fetch(`${api.url}${urlPath}`, { method, headers, body: opts.body === undefined ? undefined : JSON.stringify(opts.body) });
  const text = await res.text();
  return { status: res.status, text, body: text.startsWith('{') ? (JSON.parse(text) as any) : null };
}

/** A JSON POST leaving from `localAddress` (fetch cannot choose its source address); resolves with the status. */
function postFrom(localAddress: string | undefined, url: string, body: unknown): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = http.request(url, { method: 'POST', localAddress, headers: { 'content-type': 'application/json' } }, (res) => {
      res.resume().on('end', () => resolve(res.statusCode!));
    });
    req.on('error', reject).end(JSON.stringify(body));
  });
}

async function signIn(api: Api, email: string): Promise<Session> {
  const res = await call(api, 'POST', '/api/auth/login', { body: { email, password: TEST_PASSWORD } });
  expect(res.status, res.text).toBe(200);
  return res.body as Session;
}

/** Uploads one capture as the CLI does (raw WAV body, Idempotency-Key); a 503 is retried after Retry-After with the same key. */
async function upload(api: Api, c: PlannedCapture): Promise<{ status: number; capture: CaptureDto }> {
  for (let attempt = 1; ; attempt++) {
    const res = await fetch(`${api.url}/api/v1/projects/alpha-dsp/builds/${c.sha}/captures?testCase=${CASE}&target=board`, {
      method: 'POST',
      headers: { authorization: `Bearer ${ciToken}`, 'content-type': 'audio/wav', 'idempotency-key': c.idempotencyKey },
      body: c.wav,
    });
    const text = await res.text();
    if (res.status === 503 && attempt < 5) {
      uploadStats.retried503++;
      await new Promise((resolve) => setTimeout(resolve, Number(res.headers.get('retry-after') ?? '1') * 1000));
      continue;
    }
    expect([200, 202], `${api.name} answered ${res.status}: ${text}`).toContain(res.status);
    return { status: res.status, capture: JSON.parse(text) as CaptureDto };
  }
}

/** Runs `fn` over the items with `lanes` of them in flight at once (concurrent CI clients). */
async function inParallel<T, R>(items: T[], lanes: number, fn: (item: T, index: number) => Promise<R>): Promise<R[]> {
  const results: R[] = new Array<R>(items.length);
  let next = 0;
  await Promise.all(
    Array.from({ length: lanes }, async () => {
      while (next < items.length) {
        const i = next++;
        results[i] = await fn(items[i]!, i);
      }
    }),
  );
  return results;
}

const workerOutput = () => workers.map((w) => `--- ${w.name}:\n${w.output().slice(-1500)}`).join('\n');

async function judgedCount(ids: string[]): Promise<number> {
  const [row] = await services.query<{ n: number }>('select count(distinct capture_id)::int as n from verdict where capture_id = any($1::uuid[])', [ids]);
  return row!.n;
}

async function waitForVerdicts(ids: string[], timeoutMs: number): Promise<void> {
  await waitFor(async () => (await judgedCount(ids)) === ids.length, { what: `verdicts for all ${ids.length} captures`, timeoutMs, intervalMs: 100, context: workerOutput });
}

/** Nearest-rank percentile. */
function percentile(values: number[], p: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.max(0, Math.ceil((p / 100) * sorted.length) - 1)]!;
}

/**
 * Captures per second from the first upload to the last verdict, verdict latency (capture row →
 * verdict row) from the database's timestamps, and how long the uploads themselves took.
 */
async function throughput(ids: string[], firstUploadAt: number, lastUploadAt: number) {
  const rows = await services.query<{ latency_ms: string; verdict_at: Date }>(
    'select extract(epoch from v.created_at - c.created_at) * 1000 as latency_ms, v.created_at as verdict_at from verdict v join capture c on c.id = v.capture_id where c.id = any($1::uuid[])',
    [ids],
  );
  const latencies = rows.map((r) => Number(r.latency_ms));
  const seconds = (Math.max(...rows.map((r) => r.verdict_at.getTime())) - firstUploadAt) / 1000;
  const round = (x: number, digits = 0) => Number(x.toFixed(digits));
  return {
    captures: ids.length,
    seconds: round(seconds, 2),
    capturesPerSecond: round(ids.length / seconds, 2),
    uploadSeconds: round((lastUploadAt - firstUploadAt) / 1000, 2),
    latencyMs: { p50: round(percentile(latencies, 50)), p95: round(percentile(latencies, 95)), max: round(Math.max(...latencies)) },
  };
}

/** What each worker's JSON log says it did: `msg` lines, by the `instance` every line carries. */
function logged(w: Worker, msg: string) {
  const lines = w.logLines().filter((l) => l.msg === msg);
  for (const l of lines) expect(l.instance, `a ${msg} line of ${w.name} names its instance`).toBe(w.name);
  return lines;
}

/** Median time in the analysis thread of the given captures' first judgements, from the workers' logs. */
function threadMsP50(from: Worker[], ids: Set<string>): number {
  const ms = from.flatMap((w) => logged(w, 'capture judged').filter((l) => ids.has(String(l.captureId)) && typeof l.threadMs === 'number').map((l) => l.threadMs as number));
  return ms.length ? Math.round(percentile(ms, 50)) : 0;
}

beforeAll(async () => {
  if (hostSupport.available) hosts = createHosts([...PROCESSES]);
  else console.warn(`scale-out: processes share this machine's loopback ports, not separate hosts: ${hostSupport.reason}`);
  figures.hosts = hosts ? 'network namespaces' : 'loopback ports';
  if (hosts) figures.hostAddresses = Object.fromEntries(hosts.hosts.map((h) => [h.name, h.address]));
  services = await startProductionServices({ migrate: true });
  store = new ObjectStore({ endpoint: services.s3.endpoint, bucket: services.s3.bucket, accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' });
  // Seeded straight into the database (as the superuser), so the time goes to the pipeline.
  const orm = await initOrm({ url: services.database.superuserUrl, poolMax: 2 });
  try {
    const em = orm.em.fork();
    const fixture = await seedRoles(em);
    const project = fixture.project.id;
    const author = fixture.users.engineer.id;
    em.create(Target, { project, key: 'board', name: 'Board', sampleRate: FS });
    const testCase = em.create(TestCase, { project, key: CASE, name: 'Level sweep', stimulus: spec });
    const settings = testCaseSettings(testCase);
    em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks: levelMask(-22, -10), settings, author, reviewer: fixture.users.qa_manager.id });
    em.create(MaskRevision, { testCase, revision: 2, checks: levelMask(-45, -10), settings, author, note: 'lower floor' });
    const secret = generateTokenSecret();
    em.create(ApiToken, { project, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: fixture.users.admin.id });
    await em.flush();
    ciToken = secret.token;
  } finally {
    await orm.close();
  }
  const [api, worker] = await Promise.all([services.startApi('api-a', API_ENV, hostOf('api-a')), services.startWorker('worker-1', WORKER_ENV, hostOf('worker-1'))]);
  apiA = api;
  workers.push(worker);
}, 120_000);

afterAll(async () => {
  const file = path.join(os.tmpdir(), 'earmark-scale-out.json');
  fs.writeFileSync(file, `${JSON.stringify(figures, null, 2)}\n`);
  console.log(`scale-out figures (${file}):\n${JSON.stringify(figures, null, 2)}`);
  store?.destroy();
  try {
    await services?.close();
  } finally {
    hosts?.close(); // namespaces and veths must not outlive a failed teardown
  }
}, 60_000);

/** Counts by source address, keyed by the name of the process whose host has that address. */
function byProcess(counts: Record<string, number>): Record<string, number> {
  const nameOf = new Map(hosts!.hosts.map((h) => [h.address, h.name]));
  return Object.fromEntries(Object.entries(counts).map(([address, n]) => [nameOf.get(address) ?? address, n]));
}

/**
 * Where the processes run. On hosts: each in its own network namespace (not the test's), as node
 * itself (the pid a kill reaches), and each one's database connections arrive at the relays from
 * its own host address, which nothing on loopback could do. On loopback ports: all in the test's
 * namespace, and no relay is used.
 */
function expectPlacement(procs: BuiltProcess[]) {
  const netns = (pid: number | 'self') => fs.readlinkSync(`/proc/${pid}/ns/net`);
  const namespaces = procs.map((p) => netns(p.child.pid!));
  for (const p of procs) expect(fs.readlinkSync(`/proc/${p.child.pid}/exe`), `${p.name} is node itself`).toBe(fs.realpathSync(process.execPath));
  const relayed = services.relayedConnections();
  if (!hosts) {
    expect(new Set(namespaces)).toEqual(new Set([netns('self')]));
    expect(relayed.database).toEqual({});
    return;
  }
  expect(new Set(namespaces).size, 'one network namespace per process').toBe(procs.length);
  expect(namespaces).not.toContain(netns('self'));
  const addresses = procs.map((p) => hosts!.host(p.name).address).sort();
  expect(Object.keys(relayed.database).sort(), 'database connections by source address').toEqual(addresses);
}

describe('scale-out on one database, one object store and one relay', () => {
  it('phase 1: one API and one worker (one analysis slot) judge every capture', async () => {
    const firstUploadAt = Date.now();
    const answers = await inParallel(phase1, 3, (c) => upload(apiA, c));
    const lastUploadAt = Date.now();
    expect(answers.map((a) => a.status)).toEqual(phase1.map(() => 202));
    phase1.forEach((c, i) => accepted.set(c.idempotencyKey, answers[i]!.capture));
    const ids = answers.map((a) => a.capture.id);
    await waitForVerdicts(ids, 90_000);
    figures.phase1 = { apis: 1, workers: 1, analysisSlotsPerWorker: 1, uploadLanes: 3, ...(await throughput(ids, firstUploadAt, lastUploadAt)), analysisThreadMsP50: threadMsP50(workers, new Set(ids)) };

    const outcomes = await services.query<{ id: string; outcome: string }>('select capture_id as id, outcome from verdict where capture_id = any($1::uuid[])', [ids]);
    const byId = new Map(outcomes.map((o) => [o.id, o.outcome]));
    expect(phase1.map((c, i) => byId.get(ids[i]!))).toEqual(phase1.map((c) => (c.fails ? 'fail' : 'pass')));
    expectPlacement([apiA, ...workers]);
  }, 120_000);

  it('phase 2: two APIs and three workers, one SIGKILLed a third of the way, judge every capture exactly once', async () => {
    const [b, w2, w3] = await Promise.all([
      services.startApi('api-b', API_ENV, hostOf('api-b')),
      services.startWorker('worker-2', WORKER_ENV, hostOf('worker-2')),
      services.startWorker('worker-3', WORKER_ENV, hostOf('worker-3')),
    ]);
    apiB = b;
    workers.push(w2, w3);
    expectPlacement([apiA, apiB, ...workers]);
    const apis = [apiA, apiB];
    const phaseIds = async () => (await services.query<{ id: string }>("select c.id from capture c join build b on b.id = c.build_id where b.sha like 'b2%'")).map((r) => r.id);

    // The kill happens while uploads and analyses go on: once a third of the phase's captures are judged.
    const third = Math.ceil(phase2.length / 3);
    const kill = (async () => {
      const judged = await waitFor(
        async () => {
          const n = await judgedCount(await phaseIds());
          return n >= third ? n : null;
        },
        { what: `${third} phase-2 verdicts before the kill`, timeoutMs: 90_000, intervalMs: 50, context: workerOutput },
      );
      const [{ n: active }] = (await services.query<{ n: number }>("select count(*)::int as n from pgboss.job where name = $1 and state = 'active'", [QUEUES.analyzeCapture])) as [{ n: number }];
      await w2.kill();
      return { judgedBeforeKill: judged, analysisJobsActiveAtKill: active };
    })();
    kill.catch(() => {}); // awaited below; this only keeps an early failure from going unhandled

    const firstUploadAt = Date.now();
    const answers = await inParallel(phase2, 4, (c, i) => upload(apis[i % 2]!, c));
    const lastUploadAt = Date.now();
    expect(answers.map((a) => a.status)).toEqual(phase2.map(() => 202));
    phase2.forEach((c, i) => accepted.set(c.idempotencyKey, answers[i]!.capture));
    const ids = answers.map((a) => a.capture.id);
    const killed = await kill;
    // The same uploads again through the other API (a CI retry after a lost answer): the capture that exists, no new row.
    const replays = await Promise.all(phase2.slice(0, 6).map((c, i) => upload(apis[(i + 1) % 2]!, c)));
    expect(replays.map((r) => [r.status, r.capture.id])).toEqual(phase2.slice(0, 6).map((_, i) => [200, ids[i]]));
    await waitForVerdicts(ids, 120_000);
    // The killed worker's job comes back after its expiry and runs again on a survivor: wait for the queue to drain.
    await waitFor(
      async () => (await services.query<{ n: number }>("select count(*)::int as n from pgboss.job where name = $1 and state in ('created', 'retry', 'active')", [QUEUES.analyzeCapture]))[0]!.n === 0,
      { what: 'the analysis queue to drain after the kill', timeoutMs: 60_000, intervalMs: 200, context: workerOutput },
    );
    figures.phase2 = { apis: 2, workers: 3, analysisSlotsPerWorker: 1, uploadLanes: 4, ...(await throughput(ids, firstUploadAt, lastUploadAt)), analysisThreadMsP50: threadMsP50(workers, new Set(ids)), killed: { worker: 'worker-2', ...killed } };

    // Exactly once: one row per accepted upload, one verdict per row, nothing else.
    const rows = await services.query<{ id: string; idempotency_key: string; object_key: string; status: string; verdicts: number; outcome: string }>(
      `select c.id, c.idempotency_key, c.object_key, c.status, count(v.id)::int as verdicts, (array_agg(v.outcome))[1] as outcome
         from capture c join build b on b.id = c.build_id left join verdict v on v.capture_id = c.id
        where b.sha like 'b2%' group by c.id`,
    );
    const rowById = new Map(rows.map((r) => [r.id, r]));
    const lost = ids.filter((id) => !rowById.has(id));
    const missingObjects: string[] = [];
    for (const r of rows) await store.head(r.object_key).catch(() => missingObjects.push(r.object_key));
    const duplicated = await services.query<{ idempotency_key: string; n: number }>('select idempotency_key, count(*)::int as n from capture group by idempotency_key having count(*) > 1');
    expect({ lost, missingObjects, duplicated, rows: rows.length }).toEqual({ lost: [], missingObjects: [], duplicated: [], rows: phase2.length });
    expect(rows.filter((r) => r.verdicts !== 1 || r.status !== 'done')).toEqual([]);
    expect(phase2.map((_, i) => rowById.get(ids[i]!)!.outcome)).toEqual(phase2.map((c) => (c.fails ? 'fail' : 'pass')));
    expect(rows.map((r) => r.idempotency_key).sort()).toEqual(phase2.map((c) => c.idempotencyKey).sort());

    // Who judged what, from each worker's log: the survivors both took analyses, and between them
    // all the workers account for every capture (a re-run after the kill logs written: false).
    const phaseSet = new Set(ids);
    const jobs: Record<string, { judged: number; written: number }> = {};
    const seen = new Set<string>();
    for (const w of workers) {
      const lines = logged(w, 'capture judged').filter((l) => phaseSet.has(String(l.captureId)));
      for (const l of lines) seen.add(String(l.captureId));
      jobs[w.name] = { judged: lines.length, written: lines.filter((l) => l.written === true).length };
    }
    const [{ n: retried }] = (await services.query<{ n: number }>('select count(*)::int as n from pgboss.job where name = $1 and retry_count > 0', [QUEUES.analyzeCapture])) as [{ n: number }];
    figures.phase2 = { ...(figures.phase2 as object), analysisJobsRetried: retried, lost: lost.length + missingObjects.length, duplicated: duplicated.length, replaysAnswered200: replays.length, uploadsRetriedAfter503: uploadStats.retried503, analysisJobsPerWorker: jobs };
    expect(jobs['worker-1']!.judged, workerOutput()).toBeGreaterThan(0);
    expect(jobs['worker-3']!.judged, workerOutput()).toBeGreaterThan(0);
    expect(seen.size).toBe(phase2.length);
    expect(await w2.exited).toBeNull(); // killed by the signal, not exited on its own
    if (hosts) {
      // Both APIs stored uploads and the surviving workers read them, each from its own host.
      const objectStore = byProcess(services.relayedConnections().objectStore);
      for (const name of ['api-a', 'api-b', 'worker-1', 'worker-3']) expect(objectStore[name] ?? 0, `${name}'s object-store connections`).toBeGreaterThan(0);
      figures.relayedConnections = Object.fromEntries(Object.entries(services.relayedConnections()).map(([k, v]) => [k, byProcess(v)]));
    }
  }, 200_000);

  it('spreads impact runs over the surviving workers, and every worker computes the same answer', async () => {
    const session = await signIn(apiA, 'engineer@example.test');
    const apis = [apiA, apiB];
    const RUNS = 6;
    const started = await Promise.all(Array.from({ length: RUNS }, (_, i) => call(apis[i % 2]!, 'POST', `${MASKS}/2/impact`, { token: session.accessToken, body: { builds: 5 } })));
    for (const s of started) expect(s.status, s.text).toBe(202);
    const runs = await waitFor(
      async () => {
        const now = await Promise.all(started.map((s, i) => call(apis[(i + 1) % 2]!, 'GET', `${MASKS}/2/impact/${s.body.id}`, { token: session.accessToken })));
        const states = now.map((r) => (r.body as ImpactRunDto).state);
        if (states.includes('error')) throw new Error(`an impact run failed: ${now.map((r) => r.text).join('\n')}`);
        return states.every((s) => s === 'done') ? now.map((r) => r.body as ImpactRunDto) : null;
      },
      { what: `${RUNS} impact runs done`, timeoutMs: 90_000, intervalMs: 250, context: workerOutput },
    );

    const handledBy = new Map<string, string[]>();
    for (const w of workers) for (const l of logged(w, 'impact run done')) handledBy.set(String(l.impactRunId), [...(handledBy.get(String(l.impactRunId)) ?? []), w.name]);
    const perWorker: Record<string, number> = {};
    for (const run of runs) {
      expect(handledBy.get(run.id), `run ${run.id} finished by exactly one worker`).toHaveLength(1);
      const name = handledBy.get(run.id)![0]!;
      perWorker[name] = (perWorker[name] ?? 0) + 1;
    }
    figures.impactRunsPerWorker = perWorker;
    expect(perWorker['worker-2']).toBeUndefined();
    expect(Object.keys(perWorker).length, JSON.stringify(perWorker)).toBeGreaterThan(1);

    // The last 5 builds are phase 2's newest, one cell (the newest capture) each; the lower floor
    // of revision 2 turns exactly the failing captures into passes.
    const first = runs[0]!.result!;
    expect(first.builds.map((row) => row.sha.slice(0, 2))).toEqual(['b2', 'b2', 'b2', 'b2', 'b2']);
    expect(first.summary.captures).toBe(5);
    const failingIds = new Set(phase2.filter((c) => c.fails).map((c) => accepted.get(c.idempotencyKey)!.id));
    const evaluated = first.builds.flatMap((row) => row.captures);
    expect(evaluated.map((c) => c.flip)).toEqual(evaluated.map((c) => (failingIds.has(c.captureId) ? 'fail-to-pass' : null)));
    expect(first.summary.failToPass).toBeGreaterThan(0); // builds 9 and 11 of 12 fail, among the last five
    for (const run of runs.slice(1)) expect(run.result).toEqual(first);
  }, 120_000);

  it('derives the same limits through API A and API B (a derivation runs in the API process that answers)', async () => {
    const session = await signIn(apiB, 'engineer@example.test');
    const golden = phase2.flatMap((c) => (c.sha === passingShas(phase2)[0] ? [accepted.get(c.idempotencyKey)!.id] : []));
    expect(golden).toHaveLength(5);
    const body = { captureIds: golden, k: 2, guardDb: 0.5, maxSegments: 6, referenceHz: null };
    const [a, b] = await Promise.all([apiA, apiB].map((api) => call(api, 'POST', `${MASKS}/derive`, { token: session.accessToken, body })));
    expect(a!.status, a!.text).toBe(200);
    expect(b!.status, b!.text).toBe(200);
    const onA = a!.body as DeriveMaskResponse;
    const onB = b!.body as DeriveMaskResponse;
    expect(onA.stats.captures).toBe(5);
    expect(onB.check).toEqual(onA.check);
    expect(onB.stats).toEqual(onA.stats);
    const { derivedAt: _a, ...derivationA } = onA.derivation;
    const { derivedAt: _b, ...derivationB } = onB.derivation;
    expect(derivationB).toEqual(derivationA);
  });

  it('keeps no session state in a process: signed in on A, refreshed on B, the spent token refused on A', async () => {
    const signedIn = await signIn(apiA, 'engineer@example.test');
    const refreshed = await call(apiB, 'POST', '/api/auth/refresh', { body: { refreshToken: signedIn.refreshToken } });
    expect(refreshed.status, refreshed.text).toBe(200);
    const session = refreshed.body as Session;
    const me = await call(apiB, 'GET', '/api/me', { token: session.accessToken });
    expect([me.status, me.body?.email]).toEqual([200, 'engineer@example.test']);
    // A sees the swap B made: the first refresh token is spent there too (reuse ends the family, on both).
    expect((await call(apiA, 'POST', '/api/auth/refresh', { body: { refreshToken: signedIn.refreshToken } })).status).toBe(401);
    expect((await call(apiB, 'POST', '/api/auth/refresh', { body: { refreshToken: session.refreshToken } })).status).toBe(401);
  });

  it('stores a plot drawn on A in the object store, and B answers it from there', async () => {
    const { accessToken } = await signIn(apiA, 'engineer@example.test');
    const id = accepted.get(phase2.find((c) => !c.fails)!.idempotencyKey)!.id;
    const prefix = `plot-cache/${id}/`;
    const plotPath = `/api/projects/alpha-dsp/captures/${id}/plot?columns=256&overlay=none`;
    expect((await store.list(prefix)).filter((k) => k.endsWith('-256-0.json'))).toEqual([]);
    const onA = await call(apiA, 'GET', plotPath, { token: accessToken });
    expect(onA.status, onA.text).toBe(200);
    const keys = (await store.list(prefix)).filter((k) => k.endsWith('-256-0.json'));
    expect(keys).toHaveLength(1);
    const stored = JSON.parse((await store.get(keys[0]!)).toString('utf8')) as { plot: CapturePlot };
    expect(stored.plot.spectrum).toEqual((onA.body as CapturePlot).spectrum);
    // Mark the stored plot: an answer carrying the mark was read from the store, not drawn again.
    const mark = [{ fromHz: 1234.5, toHz: 2345.5, worstHz: 1500.25, worstMargin: -7.125 }];
    await store.put(keys[0]!, Buffer.from(JSON.stringify({ plot: { ...stored.plot, failingRegions: mark } })), 'application/json');
    const onB = await call(apiB, 'GET', plotPath, { token: accessToken });
    expect(onB.status, onB.text).toBe(200);
    expect((onB.body as CapturePlot).failingRegions).toEqual(mark);
    expect({ ...(onB.body as CapturePlot), failingRegions: [] }).toEqual({ ...(onA.body as CapturePlot), failingRegions: [] });
  });

  it(`counts failed sign-ins across A and B against one limit (${LOGIN_LIMIT})`, async () => {
    // The limit counts per client address and e-mail. One person signs in from one address, but on
    // hosts the test reaches each API from that host's gateway: leave from A's gateway for both.
    const from = hostOf('api-a')?.gateway;
    const attempt = (api: Api, password: string) => postFrom(from, `${api.url}/api/auth/login`, { email: 'viewer@example.test', password });
    const statuses: number[] = [];
    for (const api of [apiA, apiB, apiA, apiB, apiA, apiB]) statuses.push(await attempt(api, 'not the password'));
    expect(statuses).toEqual([401, 401, 401, 401, 429, 429]);
    // Past the limit even the right password waits, on either process.
    expect(await attempt(apiA, TEST_PASSWORD)).toBe(429);
  });

  it('mails each subscriber once per failed build, through the outbox and the relay, and nothing for passing builds', async () => {
    const failing = [...failingShas(phase1), ...failingShas(phase2)].sort();
    const passing = [...passingShas(phase1), ...passingShas(phase2)];
    const inboxOf = async () => (await services.smtp.messages()).filter((m) => /build [0-9a-f]+ /.test(m.subject));
    await waitFor(
      async () => {
        const [{ n: sent }] = (await services.query<{ n: number }>("select count(*)::int as n from notification where kind = 'build-failed' and state = 'sent'")) as [{ n: number }];
        return sent >= failing.length * SUBSCRIBERS.length && (await inboxOf()).length >= failing.length * SUBSCRIBERS.length;
      },
      { what: 'the build-failed mail sent and in the relay inbox', timeoutMs: 60_000, intervalMs: 250, context: workerOutput },
    );
    const outbox = await services.query<{ kind: string; sha: string; recipient: string; state: string }>("select kind, payload->>'sha' as sha, recipient, state from notification order by 2, 3");
    const expected = failing.flatMap((sha) => SUBSCRIBERS.map((recipient) => ({ kind: 'build-failed', sha, recipient, state: 'sent' })));
    expect(outbox).toEqual(expected);
    const inbox = (await inboxOf()).map((m) => ({ sha: /build ([0-9a-f]+) /.exec(m.subject)![1], to: m.to.map((t) => t.address).join(',') }));
    inbox.sort((x, y) => `${x.sha}${x.to}`.localeCompare(`${y.sha}${y.to}`));
    expect(inbox).toEqual(expected.map((e) => ({ sha: e.sha, to: e.recipient })));
    expect(inbox.filter((m) => passing.includes(m.sha!))).toEqual([]);
    figures.mail = { failedBuilds: failing.length, passingBuilds: passing.length, outboxRows: outbox.length, relayMessages: inbox.length };
    if (hosts) {
      // Mail leaves from the workers' hosts only (the outbox is theirs), never from an API's.
      const senders = Object.keys(byProcess(services.relayedConnections().mail)).sort();
      expect(senders.length).toBeGreaterThan(0);
      expect(senders.filter((name) => !name.startsWith('worker-'))).toEqual([]);
    }
  }, 90_000);
});
