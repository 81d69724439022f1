import { afterEach, describe, expect, it } from 'vitest';
import type { ReadyReport } from '@earmark/contracts';
import { Counter, checkReadiness, createMetricsRegistry, registerScrapeGauge, startMetricsServer, type MetricsServer, type ReadinessChecks } from '../src/metrics/index.js';

const ok = () => Promise.resolve();
const allOk: ReadinessChecks = { database: ok, queue: ok, objectStore: ok };

let server: MetricsServer | undefined;
afterEach(async () => {
  await server?.close();
  server = undefined;
});

async function serve(opts: { live?: () => boolean; ready?: () => Promise<ReadyReport> } = {}) {
  const registry = createMetricsRegistry('worker', 'box-7:4242');
  server = await startMetricsServer({
    host: '127.0.0.1',
    port: 0,
    registry,
    live: opts.live ?? (() => true),
    ready: opts.ready ?? (() => checkReadiness(allOk, { draining: false })),
  });
  const get = (path: string, method = 'GET') => fetch(`http://127.0.0.1:${server!.port}${path}`, { method });
  return { registry, get };
}

describe('the metrics server', () => {
  it('serves the registry in the Prometheus text format, every series labelled with process and instance', async () => {
    const { registry, get } = await serve();
    new Counter({ name: 'earmark_test_things_total', help: 'Things.', labelNames: ['kind'], registers: [registry] }).inc({ kind: 'odd' }, 3);
    const res = await get('/metrics');
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('text/plain; version=0.0.4; charset=utf-8');
    const text = await res.text();
    expect(text).toContain('# TYPE earmark_test_things_total counter');
    expect(text).toContain('earmark_test_things_total{kind="odd",process="worker",instance="box-7:4242"} 3');
    // The runtime's default series, under our prefix.
    expect(text).toMatch(/^earmark_process_resident_memory_bytes\{process="worker",instance="box-7:4242"\} \d+/m);
    expect(text).toMatch(/^earmark_nodejs_eventloop_lag_seconds\{/m);
  });

  it('answers /livez 200 while live() holds and 503 once it does not', async () => {
    let live = true;
    const { get } = await serve({ live: () => live });
    const up = await get('/livez');
    expect([up.status, await up.json()]).toEqual([200, { live: true }]);
    live = false;
    const down = await get('/livez');
    expect([down.status, await down.json()]).toEqual([503, { live: false }]);
  });

  it('answers /readyz 200 with every check ok', async () => {
    const { get } = await serve();
    const res = await get('/readyz');
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/json');
    expect(await res.json()).toEqual({ ready: true, draining: false, checks: { database: 'ok', queue: 'ok', objectStore: 'ok' }, errors: {} });
  });

  it('answers /readyz 503 naming the failing check and its error', async () => {
    const checks: ReadinessChecks = { ...allOk, objectStore: () => Promise.reject(new Error('bucket earmark-captures not reachable (HTTP 403): Forbidden')) };
    const { get } = await serve({ ready: () => checkReadiness(checks, { draining: false }) });
    const res = await get('/readyz');
    expect(res.status).toBe(503);
    expect(await res.json()).toEqual({
      ready: false,
      draining: false,
      checks: { database: 'ok', queue: 'ok', objectStore: 'failed' },
      errors: { objectStore: 'bucket earmark-captures not reachable (HTTP 403): Forbidden' },
    });
  });

  it('answers /readyz 503 while draining, without running the checks', async () => {
    let ran = 0;
    const counted: ReadinessChecks = { database: async () => void ran++, queue: async () => void ran++, objectStore: async () => void ran++ };
    const { get } = await serve({ ready: () => checkReadiness(counted, { draining: true }) });
    const res = await get('/readyz');
    expect([res.status, await res.json()]).toEqual([503, { ready: false, draining: true, checks: {}, errors: {} }]);
    expect(ran).toBe(0);
  });

  it('refuses other paths (404) and other methods (405), and answers HEAD without a body', async () => {
    const { get } = await serve();
    expect((await get('/metrics/../admin')).status).toBe(404);
    expect((await get('/')).status).toBe(404);
    const post = await get('/metrics', 'POST');
    expect([post.status, post.headers.get('allow')]).toEqual([405, 'GET, HEAD']);
    const head = await get('/livez', 'HEAD');
    expect([head.status, await head.text()]).toEqual([200, '']);
  });

  it('keeps its port bound until close() and frees it after', async () => {
    const { get } = await serve();
    const port = server!.port;
    expect((await get('/livez')).status).toBe(200);
    await server!.close();
    server = undefined;
    await expect(fetch(`http://127.0.0.1:${port}/livez`)).rejects.toThrow();
  });
});

describe('readiness checks', () => {
  it('fail a check that does not answer in time, and answer within about that time', async () => {
    const hung: ReadinessChecks = { ...allOk, database: () => new Promise(() => {}) };
    const started = Date.now();
    const report = await checkReadiness(hung, { draining: false, timeoutMs: 100 });
    expect(Date.now() - started).toBeLessThan(1000);
    expect(report).toEqual({ ready: false, draining: false, checks: { database: 'failed', queue: 'ok', objectStore: 'ok' }, errors: { database: 'database did not answer within 100 ms' } });
  });

  it('fail a check that throws before returning a promise', async () => {
    const broken: ReadinessChecks = { ...allOk, queue: () => { throw new Error('no pool'); } };
    const report = await checkReadiness(broken, { draining: false });
    expect(report.checks.queue).toBe('failed');
    expect(report.errors.queue).toBe('no pool');
  });
});

describe('scrape-time gauges', () => {
  it('show what the read returns at each scrape, and nothing (plus a failure count) when it fails or is late', async () => {
    const registry = createMetricsRegistry('api', 'i1');
    let read: () => Promise<{ labels: { queue: string }; value: number }[]> = async () => [{ labels: { queue: 'a' }, value: 4 }, { labels: { queue: 'b' }, value: 0 }];
    registerScrapeGauge(registry, { name: 'earmark_test_depth', help: 'Depth.', labelNames: ['queue'], timeoutMs: 50, read: () => read() });
    const values = async () => (await registry.getSingleMetric('earmark_test_depth')!.get()).values.map((v) => [v.labels.queue, v.value]);
    const failures = async () => (await registry.getSingleMetric('earmark_scrape_query_failures_total')!.get()).values.find((v) => v.labels.gauge === 'earmark_test_depth')?.value ?? 0;

    expect(await values()).toEqual([['a', 4], ['b', 0]]);
    read = async () => [{ labels: { queue: 'a' }, value: 1 }];
    expect(await values()).toEqual([['a', 1]]);
    read = () => Promise.reject(new Error('connection refused'));
    expect(await values()).toEqual([]);
    read = () => new Promise(() => {});
    expect(await values()).toEqual([]);
    expect(await failures()).toBe(2);
  });
});
