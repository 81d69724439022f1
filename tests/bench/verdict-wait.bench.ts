// API CPU per verdict wait answered (`GET /api/v1/captures/:id?wait=30`), against the same
// captures polled once a second without wait. The load runs in a child process
// (support/wait-load.mjs), so process.cpuUsage() here is the API's alone.
// Run: `npm run bench -- wait [captures]`.
import { execFile } from 'node:child_process';
import type { AddressInfo } from 'node:net';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { pino } from 'pino';
import { createApiRuntime, createApp, loadApiEnv } from '@earmark/api';
import { ApiToken, Build, Capture, Target, TestCase, initOrm, seedRoles } from '@earmark/db';
import { generateTokenSecret } from '@earmark/platform';
import { createBenchDatabase } from '../support/bench-database.js';

const CAPTURES = Number(process.argv[2] ?? 200);
const loadScript = fileURLToPath(new URL('./support/wait-load.mjs', import.meta.url));

const database = await createBenchDatabase('earmark_wait_bench');
const orm = await initOrm({ url: database.url, poolMax: 10 });
try {
  const fixture = await seedRoles(orm.em.fork());
  const em = orm.em.fork();
  const testCase = em.create(TestCase, { project: fixture.project.id, key: 'eq.sweep', name: 'EQ', stimulus: { kind: 'silence' } });
  const target = em.create(Target, { project: fixture.project.id, key: 'board-1', name: 'Board 1' });
  const build = em.create(Build, { project: fixture.project.id, sha: 'be4c4ed' });
  const secret = generateTokenSecret();
  em.create(ApiToken, { project: fixture.project.id, name: 'bench', prefix: secret.prefix, secretHash: secret.hash, scopes: ['read-verdicts'], createdBy: fixture.users.admin.id });
  await em.flush();
  const newCaptures = async () => {
    const fork = orm.em.fork();
    const rows = Array.from({ length: CAPTURES }, () =>
      fork.create(Capture, { project: fixture.project.id, build: build.id, testCase: testCase.id, target: target.id, objectKey: 'bench', sha256: '0'.repeat(64), sizeBytes: 1, sampleRate: 48000, channelCount: 1, frames: 1 }),
    );
    await fork.flush();
    return rows.map((c) => c.id);
  };

  const logger = pino({ level: 'silent' });
  const env = loadApiEnv({ EARMARK_DATABASE_URL: database.url, EARMARK_JWT_SECRET: 'bench-secret-bench-secret-bench-secret-00', EARMARK_WEB_DIST: '/nonexistent', EARMARK_LOG_LEVEL: 'silent', EARMARK_S3_ENDPOINT: 'http://127.0.0.1:9' });
  const runtime = await createApiRuntime(env, logger, { orm });
  const { app } = createApp(runtime);
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  const measure = async (mode: 'wait' | 'poll') => {
    const ids = await newCaptures();
    const before = process.cpuUsage();
    const { stdout } = await promisify(execFile)(process.execPath, [loadScript, mode, base, secret.token, database.url, ids.join(',')], { cwd: fileURLToPath(new URL('..', import.meta.url)) });
    const used = process.cpuUsage(before);
    const { requests, ms } = JSON.parse(stdout) as { requests: number; ms: number };
    const cpuMs = (used.user + used.system) / 1000;
    return { mode, requests, ms, cpuMs, perCapture: cpuMs / ids.length, perRequest: cpuMs / requests };
  };

  // A short warm-up, so JIT compilation is not charged to the first mode measured.
  await measure('poll');
  const rows = ['| mode | captures | requests | wall (s) | API CPU (ms) | API CPU per capture (ms) | per request (ms) |', '|---|---|---|---|---|---|---|'];
  for (const mode of ['wait', 'poll'] as const) {
    const r = await measure(mode);
    rows.push(`| ${r.mode} | ${CAPTURES} | ${r.requests} | ${(r.ms / 1000).toFixed(1)} | ${r.cpuMs.toFixed(0)} | ${r.perCapture.toFixed(2)} | ${r.perRequest.toFixed(2)} |`);
  }
  console.log(rows.join('\n'));
  await new Promise<void>((resolve) => server.close(() => resolve()));
  await runtime.close();
} finally {
  await database.drop().catch(() => {});
}
