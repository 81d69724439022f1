// Builds API under a realistic history: 100,000 captures with verdicts, then the queries
// the builds table sends, timed over HTTP. Run: `npm run bench -- api`.
import type { AddressInfo } from 'node:net';
import { performance } from 'node:perf_hooks';
import pg from 'pg';
import { pino } from 'pino';
import { createApiRuntime, createApp, loadApiEnv } from '@earmark/api';
import { TEST_PASSWORD, initOrm, seedRoles } from '@earmark/db';
import { createBenchDatabase } from '../support/bench-database.js';

const BUILDS = 20_000;
const TARGETS = 5; // one capture per target and build: 100,000 captures, each with a verdict
const ROUNDS = 60;

const database = await createBenchDatabase('earmark_api_bench');
const url = database.url;
const orm = await initOrm({ url, poolMax: 10 });
try {
  const fixture = await seedRoles(orm.em.fork());
  const db = new pg.Client({ connectionString: url });
  await db.connect();
  const t0 = performance.now();
  // Bulk history in SQL: builds over the last ~400 days on three branches, five captures each.
  await db.query(`insert into target (id, created_at, project_id, key, name) select gen_random_uuid(), now(), $1, 'board-' || g, 'Board ' || g from generate_series(1, $2::int) g`, [fixture.project.id, TARGETS]);
  await db.query(`insert into test_case (id, created_at, updated_at, project_id, key, name, stimulus, analysis, channel_map)
                  values (gen_random_uuid(), now(), now(), $1, 'eq.sweep', 'EQ', '{"kind":"silence","sampleRate":48000,"seconds":1}', '{}', '[]')`, [fixture.project.id]);
  await db.query(
    `insert into build (id, created_at, updated_at, project_id, sha, branch, label, status)
     select gen_random_uuid(), now() - (g || ' minutes')::interval * 30, now(), $1, lpad(to_hex(g * 2654435761 % 4294967296), 8, '0') || lpad(to_hex(g), 6, '0'),
            (array['main', 'release/2.x', 'feature/dsp-' || (g % 40)])[1 + g % 3], 'build ' || g, (array['pass', 'fail', 'pass', 'error', 'pass'])[1 + g % 5]
       from generate_series(1, $2::int) g`,
    [fixture.project.id, BUILDS],
  );
  await db.query(
    `insert into capture (id, created_at, project_id, build_id, test_case_id, target_id, object_key, sha256, size_bytes, format, sample_rate, channel_count, frames, status)
     select gen_random_uuid(), b.created_at, b.project_id, b.id, tc.id, t.id, 'bench', repeat('0', 64), 1000, '{"container":"wav"}', 48000, 1, 48000, 'done'
       from build b cross join target t cross join test_case tc where b.project_id = $1 and t.project_id = $1 and tc.project_id = $1`,
    [fixture.project.id],
  );
  await db.query(
    `insert into verdict (id, created_at, capture_id, outcome, engine_version)
     select gen_random_uuid(), c.created_at, c.id, (array['pass', 'pass', 'pass', 'fail', 'error'])[1 + (abs(hashtext(c.id::text)) % 5)], 'bench' from capture c`,
  );
  await db.query('analyze');
  const [{ n }] = (await db.query<{ n: string }>('select count(*) as n from capture')).rows as [{ n: string }];
  console.log(`seeded ${BUILDS} builds, ${n} captures with verdicts in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
  await db.end();

  const logger = pino({ level: 'silent' });
  const env = loadApiEnv({ EARMARK_DATABASE_URL: url, EARMARK_JWT_SECRET: 'bench-secret-bench-secret-bench-secret-00', EARMARK_WEB_DIST: '/nonexistent', EARMARK_LOG_LEVEL: 'silent', EARMARK_S3_ENDPOINT: 'http://127.0.0.1:9' });
  const runtime = await createApiRuntime(env, logger, { orm });
  const { app } = createApp(runtime);
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const login = await fetch(`${base}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'viewer@example.test', password: TEST_PASSWORD }) });
  const token = ((await login.json()) as { accessToken: string }).accessToken;

  const queries: [string, string][] = [
    ['first page, newest first', 'pageSize=25'],
    ['page 40', 'pageSize=25&page=40'],
    ['branch filter', 'branch=main&pageSize=25'],
    ['status filter', 'status=fail&pageSize=25'],
    ['SHA prefix search', 'sha=1f&pageSize=25'],
    ['target filter + date range', 'target=board-3&from=2026-06-01&to=2026-09-30&pageSize=25'],
    ['sort by branch', 'sort=branch&pageSize=25'],
  ];
  const rows: string[] = ['| query | p50 (ms) | p95 (ms) | max (ms) |', '|---|---|---|---|'];
  for (const [name, qs] of queries) {
    const times: number[] = [];
    for (let i = 0; i < ROUNDS; i++) {
      const start = performance.now();
      const res = await fetch(`${base}/api/projects/alpha-dsp/builds?${qs}`, { headers: { authorization: `Bearer ${token}` } });
      await res.arrayBuffer();
      if (!res.ok) throw new Error(`${name}: HTTP ${res.status}`);
      times.push(performance.now() - start);
    }
    times.sort((a, b) => a - b);
    const at = (q: number) => times[Math.min(times.length - 1, Math.floor(q * times.length))]!.toFixed(1);
    rows.push(`| ${name} | ${at(0.5)} | ${at(0.95)} | ${times[times.length - 1]!.toFixed(1)} |`);
  }
  console.log(`\nGET /api/projects/{p}/builds over HTTP, ${ROUNDS} rounds each, 100k captures (target: p95 < 50 ms)\n`);
  console.log(rows.join('\n'));
  server.close();
  await runtime.close();
} finally {
  await database.drop();
}
