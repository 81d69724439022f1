import { createTestDatabase } from '@earmark/db/testing';
import { TEST_PASSWORD } from '@earmark/db';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { CASE, seedCatalog, shaOf, uploadCapture } from './support/catalog.js';
import { startHealthProbe } from './support/health-probe.js';
import { hostileWav } from './support/hostile-wav.js';
import { rawUpload } from './support/raw-upload.js';
import { reliability } from './support/mode.js';
import { startProcessStack, type ProcessStack } from './support/process-stack.js';
import { recordFigures, resetFigures } from './support/results.js';

/**
 * The attack requests, each against the API process while /api/health is probed every 50 ms:
 * the probe's p99 and the API's RSS afterwards are the figures (targets: p99 < 50 ms, RSS
 * < 400 MiB). Every answer must be a success or a clear 4xx problem+json — never a 5xx.
 * Full runs only (`npm run test:reliability`): together they take a minute of CPU.
 * Bounds with their own unit tests: apps/api/test/capture-limits.test.ts (JUNK chunks, 64 MiB
 * 8-bit upload), apps/api/test/sign-in-limits.test.ts and auth.test.ts (sign-in limiter keys).
 */
const MiB = 1024 * 1024;
let stack: ProcessStack;
let engineer: string;

async function signIn(email: string, password: string, headers: Record<string, string> = {}) {
  const res = await fetch(`${stack.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json', ...headers }, body: JSON.stringify({ email, password }) });
  return { status: res.status, contentType: res.headers.get('content-type') ?? '', body: (await res.json().catch(() => null)) as { accessToken?: string } | null };
}

async function get(path: string, token = engineer, timeoutMs = 90_000) {
  const res = await fetch(`${stack.url}${path}`, { headers: { authorization: `Bearer ${token}` }, signal: AbortSignal.timeout(timeoutMs) }).catch((error: unknown) => {
    throw new Error(`GET ${path} got no answer within ${timeoutMs / 1000} s (or the connection was dropped): ${String(error)}`);
  });
  const body = Buffer.from(await res.arrayBuffer());
  return { status: res.status, contentType: res.headers.get('content-type') ?? '', bytes: body.length, text: res.status >= 400 ? body.toString() : '' };
}

/** Runs one attack under the health probe and records its figures; returns what the attack returned. */
async function underProbe<T extends { statuses: number[] }>(name: string, attack: () => Promise<T>): Promise<T> {
  const probe = startHealthProbe(stack.url, 50);
  const started = performance.now();
  let result: T;
  try {
    result = await attack();
  } catch (error) {
    // No answer (or a wrong one): the figures are still worth having.
    const health = await probe.stop();
    const rss = stack.api.child.exitCode === null ? stack.api.rssMiB() : null;
    recordFigures('hostile', [
      { name: `${name}: /api/health p99`, value: health.p99, unit: 'ms', target: { kind: 'max', value: 50 }, note: `FAILED: ${String(error).slice(0, 200)}; worst probe ${health.worstMs} ms; ${health.failures} probes failed` },
      { name: `${name}: API RSS after`, value: rss, unit: 'MiB', target: { kind: 'max', value: 400 }, note: rss === null ? 'the API process died' : '' },
    ]);
    throw error;
  }
  const seconds = (performance.now() - started) / 1000;
  const health = await probe.stop();
  const rss = stack.api.rssMiB();
  const statuses = [...new Set(result.statuses)].sort().join(', ');
  recordFigures('hostile', [
    { name: `${name}: /api/health p99`, value: health.p99, unit: 'ms', target: { kind: 'max', value: 50 }, note: `answers ${statuses}; ${seconds.toFixed(1)} s; worst probe ${health.worstMs} ms; ${health.failures} probes failed` },
    { name: `${name}: API RSS after`, value: rss, unit: 'MiB', target: { kind: 'max', value: 400 } },
  ]);
  expect(health.failures, `${name}: /api/health failed while under attack`).toBe(0);
  expect(result.statuses.filter((s) => s >= 500 || s === 0), `${name}: 5xx or dropped answers`).toEqual([]);
  return result;
}

const isProblem = (contentType: string) => contentType.startsWith('application/problem+json');

beforeAll(async () => {
  if (!reliability.full) return;
  stack = await startProcessStack({ database: await createTestDatabase() });
  await seedCatalog(stack.orm, stack.fixture);
  engineer = (await signIn('engineer@example.test', TEST_PASSWORD)).body!.accessToken!;
  resetFigures('hostile');
  recordFigures('hostile', [{ name: 'API RSS at rest before the attacks', value: stack.api.rssMiB(), unit: 'MiB' }]);
});
// Each attack meets a fresh API process, so one that dies, or keeps computing after its client
// gave up, does not colour the next one's figures; a death is noted with the API's last words.
let attacks = 0;
beforeEach(async (ctx) => {
  if (!stack || attacks++ === 0) return;
  if (stack.api.child.exitCode !== null) {
    recordFigures('hostile', [{ name: `API process died before "${ctx.task.name}"`, value: stack.api.child.exitCode, unit: 'exit code', note: stack.api.output.join('').slice(-1500) }]);
  }
  await stack.restartApi(); // access tokens stay valid: same secret
  // Warm the fresh process up (module loading, JIT, the first database connections) so its
  // start-up is not counted against the attack.
  for (let i = 0; i < 20; i++) await fetch(`${stack.url}/api/health`).then((r) => r.arrayBuffer());
  await new Promise((r) => setTimeout(r, 1000));
});

afterAll(async () => {
  // A crashed API is the finding: show why it died.
  if (stack && stack.api.child.exitCode !== null) console.error(`the API process exited with ${stack.api.child.exitCode}:\n${stack.api.output.join('').slice(-4000)}`);
  await stack?.close();
});

describe.skipIf(!reliability.full)('attack requests against the API process', () => {
  it('a plot of the largest 8-bit capture the upload accepts (a 64 MiB one is refused with 422)', { timeout: 300_000 }, async () => {
    const sha = shaOf('de', 1);
    const refused = await uploadCapture(stack.url, stack.ciToken, sha, hostileWav({ totalBytes: 64 * MiB, bits: 8 }));
    // At the decoded-sample bound: 32 Mi samples of 8-bit mono.
    const largest = await uploadCapture(stack.url, stack.ciToken, sha, hostileWav({ totalBytes: 32 * MiB + 44, bits: 8 }), { signal: AbortSignal.timeout(90_000) });
    recordFigures('hostile', [
      { name: 'upload of a 64 MiB 8-bit capture', value: Math.round(refused.ms), unit: 'ms', note: `answer ${refused.status} ${refused.text.slice(0, 160)}` },
      { name: 'upload of a 32 MiB 8-bit capture (32 Mi samples, at the bound)', value: Math.round(largest.ms), unit: 'ms', note: `answer ${largest.status}; API RSS after ${stack.api.child.exitCode === null ? `${stack.api.rssMiB()} MiB` : 'n/a (died)'}` },
    ]);
    expect(refused.status, refused.text).toBe(422);
    expect(isProblem(refused.contentType)).toBe(true);
    const statuses = [refused.status, largest.status];
    if (largest.capture) {
      const { statuses: plotStatuses } = await underProbe('plot of a 32 Mi-sample 8-bit capture', async () => {
        const plot = await get(`/api/projects/alpha-dsp/captures/${largest.capture!.id}/plot`);
        if (plot.status >= 400) expect(isProblem(plot.contentType), plot.text).toBe(true);
        return { statuses: [plot.status] };
      });
      statuses.push(...plotStatuses);
    } else {
      expect(largest.status, largest.text).toBeLessThan(500);
    }
    recordFigures('hostile', [{ name: '8-bit uploads: 64 MiB, 32 MiB, then the plot', value: null, unit: '', note: `answers ${statuses.join(', ')}` }]);
  });

  it('an upload of a 64 MiB WAV made of 8 million empty JUNK chunks → 422, nothing stored', async () => {
    const wav = hostileWav({ totalBytes: 64 * MiB, bits: 16, junkChunks: 8_000_000 });
    const { statuses } = await underProbe('64 MiB WAV of 8 M JUNK chunks', async () => {
      const res = await rawUpload(`${stack.url}/api/v1/projects/alpha-dsp/builds/${shaOf('de', 2)}/captures?testCase=${CASE}&target=board`, stack.ciToken, wav);
      recordFigures('hostile', [{ name: '64 MiB WAV of 8 M JUNK chunks: time to the answer', value: Math.round(res.ms), unit: 'ms', note: `answer ${res.status}${res.writeError ? `; the connection was closed while the body was still being sent (${res.writeError})` : ''}` }]);
      expect(res.status, `${res.writeError ?? ''} ${res.text}`).toBe(422);
      expect(isProblem(res.contentType)).toBe(true);
      return { statuses: [res.status] };
    });
    expect(statuses).toEqual([422]);
    expect(await stack.objectStore.list(`captures/alpha-dsp/${shaOf('de', 2)}/`)).toEqual([]);
  });

  it('a stimulus download of a 5 s, 4,096-tone multitone', { timeout: 240_000 }, async () => {
    const admin = (await signIn('admin@example.test', TEST_PASSWORD)).body?.accessToken ?? engineer;
    const create = await fetch(`${stack.url}/api/projects/alpha-dsp/test-cases`, {
      method: 'POST',
      headers: { authorization: `Bearer ${admin}`, 'content-type': 'application/json' },
      body: JSON.stringify({ key: 'many.tones', name: 'Many tones', stimulus: { kind: 'multitone', sampleRate: 48000, seconds: 5, from: 20, to: 20000, count: 4096, levelDbfs: -20 } }),
    });
    const statuses = [create.status];
    if (create.status === 201 || create.status === 200) {
      const { statuses: got } = await underProbe('stimulus of a 5 s 4,096-tone multitone', async () => {
        const res = await get('/api/projects/alpha-dsp/test-cases/many.tones/stimulus.wav', admin);
        if (res.status >= 400) expect(isProblem(res.contentType), res.text).toBe(true);
        else expect(res.bytes).toBeGreaterThan(5 * 48000 * 4);
        return { statuses: [res.status] };
      });
      statuses.push(...got);
    } else {
      expect(create.status).toBe(422);
      expect(isProblem(create.headers.get('content-type') ?? '')).toBe(true);
    }
    expect(statuses.every((s) => s < 500)).toBe(true);
  });

  it('a stimulus of 60 s × 192 kHz × 8 channels is refused with a 422 naming the sample budget', async () => {
    const { statuses } = await underProbe('60 s × 192 kHz × 8 ch stimulus', async () => {
      const res = await fetch(`${stack.url}/api/projects/alpha-dsp/test-cases`, {
        method: 'POST',
        headers: { authorization: `Bearer ${engineer}`, 'content-type': 'application/json' },
        body: JSON.stringify({ key: 'huge.noise', name: 'Huge', stimulus: { kind: 'white-noise', sampleRate: 192000, channels: 8, seconds: 60, levelDbfs: -20 } }),
      });
      const text = await res.text();
      expect(res.status, text).toBe(422);
      expect(isProblem(res.headers.get('content-type') ?? '')).toBe(true);
      expect(text).toMatch(/92,160,000 samples/);
      return { statuses: [res.status] };
    });
    expect(statuses).toEqual([422]);
  });

  it('one e-mail with 50 different X-Forwarded-For values: the limiter is not dodged (trust proxy is off)', async () => {
    const { statuses } = await underProbe('one e-mail, 50 X-Forwarded-For values', async () => {
      const answers = [];
      for (let i = 0; i < 50; i++) answers.push(await signIn('engineer@example.test', 'wrong password', { 'x-forwarded-for': `203.0.113.${i + 1}` }));
      return { statuses: answers.map((a) => a.status) };
    });
    // 10 failed attempts per address and e-mail in 15 minutes (EARMARK_LOGIN_RATE_LIMIT), then 429.
    expect(statuses.filter((s) => s === 401).length).toBeLessThanOrEqual(10);
    expect(statuses.filter((s) => s === 429).length).toBeGreaterThanOrEqual(40);
  });

  it('200 sign-ins with unknown e-mails, 16 in parallel: 401 or 429, never 5xx', async () => {
    const { statuses } = await underProbe('200 unknown-e-mail sign-ins, 16 at once', async () => {
      const all: number[] = [];
      let next = 0;
      await Promise.all(
        Array.from({ length: 16 }, async () => {
          for (let i = next++; i < 200; i = next++) all.push((await signIn(`nobody-${i}@example.test`, 'guess-123456')).status);
        }),
      );
      return { statuses: all };
    });
    expect(statuses.every((s) => s === 401 || s === 429)).toBe(true);
    expect(statuses).toContain(429);
  });

  it('the test case for the load stays downloadable afterwards (the API is still healthy)', async () => {
    const res = await get(`/api/projects/alpha-dsp/test-cases/${CASE}/stimulus.wav`);
    expect(res.status).toBe(200);
  });
});
