// /api/health latency while 16 sign-ins arrive at once (bcrypt cost 12 each), 5 rounds:
// shows whether password checks hold up the event loop. Run: `npm run bench -- signin`.
import type { AddressInfo } from 'node:net';
import { performance } from 'node:perf_hooks';
import { pino } from 'pino';
import { createApiRuntime, createApp, loadApiEnv } from '@earmark/api';
import { TEST_PASSWORD, initOrm, seedRoles } from '@earmark/db';
import { createBenchDatabase } from '../support/bench-database.js';

const ROUNDS = 5;
const PARALLEL = 16;

const database = await createBenchDatabase('earmark_signin_bench');
const orm = await initOrm({ url: database.url, poolMax: 10 });
try {
  await seedRoles(orm.em.fork());
  const env = loadApiEnv({
    EARMARK_DATABASE_URL: database.url, EARMARK_JWT_SECRET: 'bench-secret-bench-secret-bench-secret-00', EARMARK_WEB_DIST: '/nonexistent',
    EARMARK_LOG_LEVEL: 'silent', EARMARK_S3_ENDPOINT: 'http://127.0.0.1:9',
    EARMARK_LOGIN_RATE_LIMIT: '100000', EARMARK_LOGIN_RATE_LIMIT_PER_ADDRESS: '100000', EARMARK_LOGIN_RATE_LIMIT_PER_EMAIL: '100000', EARMARK_LOGIN_GLOBAL_PER_MINUTE: '100000',
  });
  const runtime = await createApiRuntime(env, pino({ level: 'silent' }), { orm });
  const { app } = createApp(runtime);
  const server = app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => server.once('listening', resolve));
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const signIn = (i: number) =>
    fetch(`${base}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: i % 2 ? 'viewer@example.test' : `nobody-${i}@example.test`, password: i % 4 === 1 ? TEST_PASSWORD : 'wrong-guess' }) }).then((r) => r.status);

  await signIn(1); // warm-up: the dummy hash, JIT, connections
  const health: number[] = [];
  const statuses = new Map<number, number>();
  for (let round = 0; round < ROUNDS; round++) {
    let busy = true;
    const probe = (async () => {
      while (busy) {
        const t = performance.now();
        await (await fetch(`${base}/api/health`)).arrayBuffer();
        health.push(performance.now() - t);
        await new Promise((resolve) => setTimeout(resolve, 10));
      }
    })();
    const codes = await Promise.all(Array.from({ length: PARALLEL }, (_, i) => signIn(i)));
    for (const c of codes) statuses.set(c, (statuses.get(c) ?? 0) + 1);
    busy = false;
    await probe;
  }
  health.sort((a, b) => a - b);
  const at = (q: number) => health[Math.min(health.length - 1, Math.floor(q * health.length))]!.toFixed(1);
  console.log(`sign-ins: ${[...statuses].map(([s, n]) => `${n}× ${s}`).join(', ')}`);
  console.log(`/api/health during them (${health.length} probes): p50 ${at(0.5)} ms, p99 ${at(0.99)} ms, max ${health[health.length - 1]!.toFixed(1)} ms`);
  await new Promise<void>((resolve) => server.close(() => resolve()));
  await runtime.close();
} finally {
  await database.drop().catch(() => {});
}
