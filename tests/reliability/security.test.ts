import { TEST_PASSWORD } from '@earmark/db';
import { createTestDatabase } from '@earmark/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { passingCaptureWav, seedCatalog, shaOf, shortSweepSpec, SOAK_CASE, uploadCapture } from './support/catalog.js';
import { startProcessStack, STACK_JWT_SECRET, type ProcessStack } from './support/process-stack.js';
import { reliability } from './support/mode.js';
import { recordFigures, resetFigures } from './support/results.js';
import { leakedSecrets } from './support/secret-scan.js';

/**
 * Security checks against the API process. Covered by apps/api/test and not repeated here:
 * JWT tampering — alg none, wrong key, expired, refresh token as access token (auth.test.ts);
 * token scope across projects and 404 for foreign resources (existence-leak.test.ts,
 * api-tokens.test.ts); revoked and forged CI tokens (api-tokens.test.ts); every route × role
 * (role-matrix.test.ts); sign-in brute force → 429 (auth.test.ts, sign-in-limits.test.ts, and
 * hostile-requests.test.ts against the process). Added here: traversal in keys and file names,
 * oversized headers and bodies, security headers on every kind of answer, injection in every
 * query parameter the OpenAPI document lists, and a scan of every log line for secrets.
 */
const MAX_CAPTURE_BYTES = 2 * 1024 * 1024;
let stack: ProcessStack;
let admin: string;
let captureId: string;
const sha = shaOf('5ec', 1);
const issued: Record<string, string> = {};

async function call(method: string, path: string, opts: { token?: string; body?: BodyInit; headers?: Record<string, string> } = {}) {
  const res = await fetch(`${stack.url}${path}`, { method, body: opts.body, headers: { ...(opts.token ? { authorization: `Bearer ${opts.token}` } : {}), ...opts.headers } });
  const text = await res.text();
  return { status: res.status, headers: res.headers, contentType: res.headers.get('content-type') ?? '', text };
}

const isProblem = (r: { contentType: string }) => r.contentType.startsWith('application/problem+json');
/** What an answer must never show: SQL, driver or stack-trace text. */
const LEAK = /syntax error|at character|\bselect\b.*\bfrom\b|knex|postgres|pg_|node_modules|\n\s+at /i;

beforeAll(async () => {
  stack = await startProcessStack({ database: await createTestDatabase(), apiEnv: { EARMARK_MAX_CAPTURE_BYTES: String(MAX_CAPTURE_BYTES) } });
  await seedCatalog(stack.orm, stack.fixture);
  const login = await call('POST', '/api/auth/login', { body: JSON.stringify({ email: 'admin@example.test', password: TEST_PASSWORD }), headers: { 'content-type': 'application/json' } });
  const session = JSON.parse(login.text) as { accessToken: string; refreshToken: string };
  admin = session.accessToken;
  issued['access token'] = session.accessToken;
  issued['refresh token'] = session.refreshToken;
  const up = await uploadCapture(stack.url, stack.ciToken, sha, passingCaptureWav(shortSweepSpec), { testCase: SOAK_CASE });
  expect(up.status, up.text).toBe(202);
  captureId = up.capture!.id;
  resetFigures('security');
});
afterAll(() => stack?.close());

describe('traversal in keys and file names', () => {
  it('refuses dot-dot and encoded separators in every path segment with a 4xx problem', async () => {
    const paths = [
      '/api/projects/alpha-dsp/test-cases/..%2F..%2F..%2Fetc%2Fpasswd/stimulus.wav',
      '/api/projects/..%2Falpha-dsp/builds',
      '/api/projects/alpha-dsp/targets/..%5C..%5Cwindows',
      `/api/projects/alpha-dsp/captures/${captureId}/audio/..%2F..%2Fcapture`,
      '/api/v1/projects/alpha-dsp/builds/..%2F..%2Fabc1234',
      '/api/v1/captures/..%2F..%2F',
    ];
    for (const path of paths) {
      const res = await call('GET', path, { token: path.startsWith('/api/v1/') ? stack.ciToken : admin });
      expect(res.status, `${path}: ${res.text}`).toBeGreaterThanOrEqual(400);
      expect(res.status, path).toBeLessThan(500);
      expect(isProblem(res), path).toBe(true);
      expect(res.text).not.toMatch(/root:|\[boot loader\]/);
    }
  });

  it('serves no file outside the web folder for a traversal in the page path', async () => {
    for (const path of ['/..%2f..%2f..%2fetc%2fpasswd', '/%2e%2e/%2e%2e/etc/passwd', '/assets/..%2f..%2f..%2fpackage.json']) {
      const res = await call('GET', path);
      expect(res.text, path).not.toMatch(/root:x:0|"name": "earmark"/);
    }
  });

  it('refuses a traversal in test case and target keys and in upload names; stored object keys stay inside the build', async () => {
    for (const key of ['../escape', 'a/../../b', '..', 'x%2F..']) {
      const res = await call('POST', '/api/projects/alpha-dsp/targets', { token: admin, body: JSON.stringify({ key, name: 'x' }), headers: { 'content-type': 'application/json' } });
      expect(res.status, key).toBe(422);
      expect(isProblem(res)).toBe(true);
    }
    const byQuery = await call('POST', `/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=..%2F..%2Fsoak.sweep&target=board`, { token: stack.ciToken, body: passingCaptureWav(shortSweepSpec), headers: { 'content-type': 'audio/wav' } });
    expect(byQuery.status).toBeGreaterThanOrEqual(400);
    expect(byQuery.status).toBeLessThan(500);
    const form = new FormData();
    form.set('testCase', SOAK_CASE);
    form.set('target', 'board');
    form.set('file', new Blob([passingCaptureWav(shortSweepSpec)], { type: 'audio/wav' }), '../../../../tmp/evil.wav');
    const multipart = await call('POST', `/api/v1/projects/alpha-dsp/builds/${sha}/captures`, { token: stack.ciToken, body: form });
    expect([202, 422]).toContain(multipart.status);
    const keys = await stack.objectStore.list('');
    expect(keys.filter((k) => k.startsWith('captures/')).every((k) => /^captures\/alpha-dsp\/[0-9a-f]+\/[0-9a-f-]{36}\.(wav|f32)$/.test(k)), keys.join('\n')).toBe(true);
    expect(keys.some((k) => k.includes('..') || k.includes('evil'))).toBe(false);
  });
});

describe('oversized headers and bodies', () => {
  it('answers a 64 KiB header with 431 and keeps serving', async () => {
    const res = await call('GET', '/api/health', { headers: { 'x-padding': 'a'.repeat(64 * 1024) } });
    expect(res.status).toBe(431);
    expect((await call('GET', '/api/health')).status).toBe(200);
  });

  it('answers a JSON body over 1 MB with 413 problem+json', async () => {
    const res = await call('POST', '/api/auth/login', { body: JSON.stringify({ email: 'a@b.c', password: 'x'.repeat(2 * 1024 * 1024) }), headers: { 'content-type': 'application/json' } });
    expect(res.status).toBe(413);
    expect(isProblem(res)).toBe(true);
  });

  it('answers an upload over EARMARK_MAX_CAPTURE_BYTES with 413 problem+json, nothing stored', async () => {
    const before = (await stack.objectStore.list('captures/')).length;
    const res = await call('POST', `/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=${SOAK_CASE}&target=board`, { token: stack.ciToken, body: Buffer.alloc(MAX_CAPTURE_BYTES + 1024), headers: { 'content-type': 'audio/wav' } });
    expect(res.status).toBe(413);
    expect(isProblem(res)).toBe(true);
    expect((await stack.objectStore.list('captures/')).length).toBe(before);
  });
});

describe('security headers', () => {
  it('sends them on JSON, problem, WAV and page answers alike', async () => {
    const answers = [
      await call('GET', '/api/health'),
      await call('GET', '/api/projects/alpha-dsp/builds', { token: 'not-a-token' }),
      await call('GET', `/api/projects/alpha-dsp/test-cases/${SOAK_CASE}/stimulus.wav`, { token: admin }),
      await call('GET', '/api/docs'),
    ];
    expect(answers.map((a) => a.status)).toEqual([200, 401, 200, 200]);
    for (const a of answers) {
      expect(a.headers.get('x-content-type-options')).toBe('nosniff');
      expect(a.headers.get('x-frame-options') ?? a.headers.get('content-security-policy')).toBeTruthy();
      expect(a.headers.get('x-powered-by')).toBeNull();
    }
    expect(answers[3]!.headers.get('content-security-policy')).toMatch(/default-src/);
  });
});

describe('injection in every query parameter of the OpenAPI document', () => {
  const all = ["' OR '1'='1", "'; drop table capture; --", '1) or (1=1', '{"$ne":null}', '__proto__', '<script>alert(1)</script>', '%00', '../../etc/passwd', 'x'.repeat(5000), '-1', '1e309'];
  // Inside `npm test` three of them (SQL, operator object, oversized) keep the quick run short.
  const payloads = reliability.full ? all : [all[0]!, all[3]!, all[8]!];

  it('answers 2xx or a 4xx problem+json to each, never a 5xx or a database message, and changes nothing', async () => {
    const doc = JSON.parse((await call('GET', '/api/v1/openapi.json')).text) as { paths: Record<string, Record<string, { parameters?: { in: string; name: string }[] }>> };
    const values: Record<string, string> = { project: 'alpha-dsp', sha, caseKey: SOAK_CASE, targetKey: 'board', id: captureId, kind: 'capture', revision: '1' };
    const targets = Object.entries(doc.paths).flatMap(([path, ops]) =>
      Object.entries(ops)
        .filter(([method]) => method === 'get')
        .map(([, op]) => ({ path, query: (op.parameters ?? []).filter((p) => p.in === 'query').map((p) => p.name) }))
        .filter((t) => t.query.length > 0),
    );
    expect(targets.length, 'the OpenAPI document lists no query parameters').toBeGreaterThan(3);
    const counts = async () => (await stack.orm.em.fork().getConnection().execute<{ n: string }[]>(`select (select count(*) from capture) + (select count(*) from app_user) + (select count(*) from finding) + (select count(*) from build) as n`))[0]!.n;
    const before = await counts();
    let requests = 0;
    for (const { path, query } of targets) {
      const concrete = path.replace(/\{(\w+)\}/g, (_, name: string) => values[name] ?? '00000000-0000-4000-8000-000000000000');
      const token = path.startsWith('/api/v1/') ? stack.ciToken : admin;
      for (const name of query) {
        for (const payload of payloads) {
          const res = await call('GET', `${concrete}?${new URLSearchParams({ [name]: payload })}`, { token });
          requests++;
          const where = `${path}?${name}=${payload.slice(0, 40)} → ${res.status} ${res.text.slice(0, 300)}`;
          expect(res.status, where).toBeLessThan(500);
          if (res.status >= 400) expect(isProblem(res), where).toBe(true);
          expect(res.text, where).not.toMatch(LEAK);
        }
      }
    }
    expect(await counts()).toBe(before);
    recordFigures('security', [{ name: 'injection requests (GET routes with query parameters × payloads)', value: requests, unit: '', note: `${targets.length} routes: ${targets.map((t) => `${t.path} (${t.query.join(', ')})`).join('; ')}` }]);
  });
});

describe('secrets in logs', () => {
  it('writes no JWT secret, password, access, refresh or CI token to any log line of the API or worker', async () => {
    // A failed sign-in and a bad token make sure the log has lines about authentication.
    await call('POST', '/api/auth/login', { body: JSON.stringify({ email: 'admin@example.test', password: `${TEST_PASSWORD}-wrong` }), headers: { 'content-type': 'application/json' } });
    await call('GET', '/api/me', { token: `${admin}tampered` });
    await new Promise((r) => setTimeout(r, 300));
    const output = stack.allOutput();
    expect(output.length).toBeGreaterThan(100);
    expect(leakedSecrets(output, { 'JWT secret': STACK_JWT_SECRET, password: TEST_PASSWORD, 'CI token': stack.ciToken, 'CI token secret': stack.ciToken.split('_')[2]!, ...issued })).toEqual([]);
  });
});
