// CPU the API process spends per 1 MiB capture upload, over many sequential uploads through
// HTTP (auth, body, decode in the compute thread, object store, rows, job). Run: `npm run bench -- ingest`.
// The uploads come from a child process, so process.cpuUsage() here counts the API alone: its
// event loop and its compute thread. EARMARK_BENCH_PROFILE=<file> writes a CPU profile of the
// event loop over the measured uploads.
import { fork } from 'node:child_process';
import fs from 'node:fs';
import { Session } from 'node:inspector/promises';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import pg from 'pg';
import { pino } from 'pino';
import { encodeWav } from '@earmark/dsp';
import { initOrm, seedRoles } from '@earmark/db';
import { startS3Fake } from '@earmark/infra/fakes';
import { startTestCluster } from '@earmark/infra/test-cluster';
import { generateTokenSecret } from '@earmark/platform';
import { createApiRuntime, createApp, loadApiEnv } from '../src/index.js';

const WARMUP = 15;
const FRAMES = 262_144 - 14; // float32 mono: 1 MiB with the header

/** The child: sequential uploads to the API named on its command line. */
async function sendUploads(base: string, token: string, from: number, count: number): Promise<void> {
  const body = Buffer.from(encodeWav([Float64Array.from({ length: FRAMES }, (_, i) => 0.25 * Math.sin((2 * Math.PI * 997 * i) / 48000))], 48000, { encoding: 'float', bitsPerSample: 32 }));
  for (let i = from; i < from + count; i++) {
    const res = await fetch(`${base}/api/v1/projects/alpha-dsp/builds/${(0xb000000 + Math.floor(i / 8)).toString(16)}/captures?testCase=tone&target=board`, {
      method: 'POST',
      headers: { authorization: `Bearer ${token}`, 'content-type': 'audio/wav' },
      body,
    });
    await res.arrayBuffer();
    if (res.status !== 202) throw new Error(`upload ${i}: HTTP ${res.status}`);
  }
}

function uploadsFromChild(base: string, token: string, from: number, count: number): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = fork(fileURLToPath(import.meta.url), ['--client', base, token, String(from), String(count)], { execArgv: ['--import', 'tsx'], stdio: 'inherit' });
    child.once('exit', (code) => (code === 0 ? resolve() : reject(new Error(`the upload client exited with ${code}`))));
  });
}

async function measure(uploads: number): Promise<void> {
  const { cluster, templateDb } = await startTestCluster();
  const dbName = `earmark_ingest_bench_${Date.now()}`;
  const admin = new pg.Client({ connectionString: cluster.url('postgres') });
  await admin.connect();
  await admin.query(`create database "${dbName}" template "${templateDb}"`);
  const url = cluster.url(dbName);
  const s3Dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-bench-s3-'));
  const s3 = await startS3Fake({ port: 0, directory: s3Dir, bucket: 'earmark-captures' });
  const orm = await initOrm({ url, poolMax: 10 });
  try {
    const fixture = await seedRoles(orm.em.fork());
    const db = new pg.Client({ connectionString: url });
    await db.connect();
    const p = fixture.project.id;
    await db.query(`insert into target (id, created_at, project_id, key, name, sample_rate) values (gen_random_uuid(), now(), $1, 'board', 'Board', 48000)`, [p]);
    await db.query(
      `insert into test_case (id, created_at, updated_at, project_id, key, name, stimulus, analysis, channel_map)
       values (gen_random_uuid(), now(), now(), $1, 'tone', 'Tone', '{"kind":"sine","sampleRate":48000,"seconds":1,"frequency":997}', '{}', '[]')`,
      [p],
    );
    const secret = generateTokenSecret();
    await db.query(`insert into api_token (id, created_at, project_id, name, prefix, secret_hash, scopes, created_by_id) values (gen_random_uuid(), now(), $1, 'bench', $2, $3, $4, $5)`, [
      p,
      secret.prefix,
      secret.hash,
      JSON.stringify(['submit-captures', 'read-verdicts']),
      fixture.users.admin.id,
    ]);
    await db.end();

    const env = loadApiEnv({ EARMARK_DATABASE_URL: url, EARMARK_JWT_SECRET: 'bench-secret-bench-secret-bench-secret-00', EARMARK_WEB_DIST: '/nonexistent', EARMARK_LOG_LEVEL: 'silent', EARMARK_S3_ENDPOINT: s3.endpoint });
    const runtime = await createApiRuntime(env, pino({ level: 'silent' }), { orm });
    const { app } = createApp(runtime);
    const server = app.listen(0, '127.0.0.1');
    await new Promise<void>((resolve) => server.once('listening', resolve));
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

    await uploadsFromChild(base, secret.token, 0, WARMUP);
    const profiler = process.env.EARMARK_BENCH_PROFILE ? new Session() : null;
    if (profiler) {
      profiler.connect();
      await profiler.post('Profiler.enable');
      await profiler.post('Profiler.start');
    }
    const cpu = process.cpuUsage();
    const started = performance.now();
    await uploadsFromChild(base, secret.token, WARMUP, uploads);
    const wall = performance.now() - started;
    const used = process.cpuUsage(cpu);
    if (profiler) fs.writeFileSync(process.env.EARMARK_BENCH_PROFILE!, JSON.stringify((await profiler.post('Profiler.stop')).profile));
    const perUpload = (us: number) => (us / 1000 / uploads).toFixed(1);
    console.log(`\n${uploads} sequential uploads of 1 MiB (float32 WAV) from a child process; CPU of the API process (event loop + compute thread), Node ${process.version}`);
    console.log('| per upload | CPU user (ms) | CPU system (ms) | CPU total (ms) | wall (ms) |\n|---|---|---|---|---|');
    console.log(`| 1 MiB | ${perUpload(used.user)} | ${perUpload(used.system)} | ${perUpload(used.user + used.system)} | ${(wall / uploads).toFixed(1)} |`);
    await new Promise<void>((resolve) => server.close(() => resolve()));
    await runtime.close();
  } finally {
    await s3.close();
    fs.rmSync(s3Dir, { recursive: true, force: true });
    await admin.query(`drop database if exists "${dbName}" with (force)`);
    await admin.end();
  }
}

if (process.argv[2] === '--client') await sendUploads(process.argv[3]!, process.argv[4]!, Number(process.argv[5]), Number(process.argv[6]));
else await measure(Number(process.argv[2] ?? 120));
