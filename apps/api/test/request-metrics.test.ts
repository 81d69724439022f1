import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

/**
 * The API's request and upload series, and its probes on the main port: counted by route
 * template (never the URL), `unmatched` for unknown paths, uploads by outcome.
 */
let api: TestApi;
let admin: string;
beforeAll(async () => {
  api = await startTestApi();
  admin = await api.login('admin@example.test');
}, 60_000);
afterAll(() => api?.close());

/** The value of one series of a counter (or a histogram's `_count` with `count: true`), 0 when absent. */
async function value(name: string, labels: Record<string, string>, opts: { count?: boolean } = {}): Promise<number> {
  const metric = api.runtime.metrics.getSingleMetric(name);
  if (!metric) throw new Error(`no metric ${name}`);
  const wanted = opts.count ? `${name}_count` : name;
  // Histograms name each value (`_bucket`, `_sum`, `_count`); counters do not.
  const values = (await metric.get()).values as { value: number; labels: Record<string, string | number | undefined>; metricName?: string }[];
  const series = values.filter((v) => (v.metricName ?? name) === wanted && Object.entries(labels).every(([k, l]) => v.labels[k] === l));
  return series.reduce((sum, v) => sum + v.value, 0);
}

describe('request metrics', () => {
  it('count a request under its route template, not its URL, and time it', async () => {
    const route = '/api/v1/captures/:id';
    const before = await value('earmark_http_requests_total', { method: 'GET', route, status: '404' });
    const timedBefore = await value('earmark_http_request_duration_seconds', { method: 'GET', route }, { count: true });
    for (const id of ['0f4c1a52-7d4e-4b8e-9a39-5a4f1d2c9e01', '0f4c1a52-7d4e-4b8e-9a39-5a4f1d2c9e02']) {
      expect((await api.request('GET', `/api/v1/captures/${id}`, { token: admin })).status).toBe(404);
    }
    expect(await value('earmark_http_requests_total', { method: 'GET', route, status: '404' })).toBe(before + 2);
    expect(await value('earmark_http_request_duration_seconds', { method: 'GET', route }, { count: true })).toBe(timedBefore + 2);
    // No series names a concrete id.
    const text = await api.runtime.metrics.metrics();
    expect(text).not.toContain('0f4c1a52');
  });

  it('count a path no route serves as unmatched', async () => {
    const before = await value('earmark_http_requests_total', { route: 'unmatched', status: '404' });
    expect((await api.request('GET', '/api/no/such/thing/9b1e')).status).toBe(404);
    expect(await value('earmark_http_requests_total', { route: 'unmatched', status: '404' })).toBe(before + 1);
    expect(await api.runtime.metrics.metrics()).not.toContain('9b1e');
  });

  it('count a refused capture upload, and no bytes for it', async () => {
    const refused = await value('earmark_capture_uploads_total', { outcome: 'refused' });
    const bytes = await value('earmark_capture_upload_bytes_total', {});
    const res = await api.request('POST', '/api/v1/projects/alpha-dsp/builds/abc1234/captures?testCase=nope', { token: admin, rawBody: 'RIFF-not-really', headers: { 'content-type': 'audio/wav' } });
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
    expect(await value('earmark_capture_uploads_total', { outcome: 'refused' })).toBe(refused + 1);
    expect(await value('earmark_capture_uploads_total', { outcome: 'accepted' })).toBe(0);
    expect(await value('earmark_capture_upload_bytes_total', {})).toBe(bytes);
    expect(await value('earmark_http_requests_total', { method: 'POST', route: '/api/v1/projects/:project/builds/:sha/captures', status: String(res.status) })).toBe(1);
  });
});

describe('probes on the main port', () => {
  it('answer live, and ready with every check named', async () => {
    const live = await api.request('GET', '/api/health/live');
    expect([live.status, live.body]).toEqual([200, { live: true }]);
    const ready = await api.request('GET', '/api/health/ready');
    expect([ready.status, ready.body]).toEqual([200, { ready: true, draining: false, checks: { database: 'ok', queue: 'ok', objectStore: 'ok' }, errors: {} }]);
  });

  it('answer 503 naming the object store while it is down, and 200 again once it is back', async () => {
    await api.s3.stop();
    try {
      const res = await api.request('GET', '/api/health/ready');
      expect(res.status).toBe(503);
      expect(res.body.checks).toEqual({ database: 'ok', queue: 'ok', objectStore: 'failed' });
      // The public port names the failing check only; its message (hosts, bucket) is for the metrics port's /readyz.
      expect(res.body.errors).toEqual({});
      const internal = await api.runtime.health.ready();
      expect(internal.errors.objectStore).toMatch(/^bucket earmark-captures not reachable/);
      // Liveness does not follow a dependency: restarting the API would not bring the store back.
      expect((await api.request('GET', '/api/health/live')).status).toBe(200);
    } finally {
      await api.s3.restart();
    }
    expect((await api.request('GET', '/api/health/ready')).status).toBe(200);
  });

  it('answer 503 draining once shutdown has begun, while liveness stays 200', async () => {
    api.runtime.lifecycle.draining = true;
    try {
      const res = await api.request('GET', '/api/health/ready');
      expect([res.status, res.body]).toEqual([503, { ready: false, draining: true, checks: {}, errors: {} }]);
      expect((await api.request('GET', '/api/health/live')).status).toBe(200);
      // Any other request arriving on a kept-alive connection: 503 problem, connection closed, retry elsewhere.
      const other = await api.request('GET', '/api/health');
      expect([other.status, other.headers.get('content-type'), other.headers.get('connection'), other.headers.get('retry-after')]).toEqual([503, 'application/problem+json; charset=utf-8', 'close', '2']);
      expect(other.body).toMatchObject({ status: 503, title: 'Shutting down' });
    } finally {
      api.runtime.lifecycle.draining = false;
    }
  });
});
