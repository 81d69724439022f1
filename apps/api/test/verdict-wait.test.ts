import { ApiToken, Build, Capture, Target, TestCase, Verdict } from '@earmark/db';
import { generateTokenSecret } from '@earmark/platform';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { VerdictWaits } from '../src/waits/verdict-waits.js';
import { startTestApi } from './support/test-api.js';

/** A project with one CI token and a way to make captures and record their verdicts directly. */
async function setUp(envOverrides: Record<string, string> = {}) {
  const api = await startTestApi(envOverrides);
  const em = api.orm.em.fork();
  const project = api.fixture.project;
  const testCase = em.create(TestCase, { project: project.id, key: 'tone.997', name: 'tone', stimulus: { kind: 'silence' } });
  const target = em.create(Target, { project: project.id, key: 'board-a', name: 'Board A' });
  const build = em.create(Build, { project: project.id, sha: 'c0ffee1' });
  const secret = generateTokenSecret();
  em.create(ApiToken, { project: project.id, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: api.fixture.users.admin.id });
  await em.flush();
  const newCapture = async () => {
    const fork = api.orm.em.fork();
    const capture = fork.create(Capture, {
      project: project.id, build: build.id, testCase: testCase.id, target: target.id,
      objectKey: 'k', sha256: 'a'.repeat(64), sizeBytes: 10, sampleRate: 48000, channelCount: 1, frames: 1,
    });
    await fork.flush();
    return capture.id;
  };
  const recordVerdict = async (captureId: string) => {
    await api.orm.em.fork().transactional(async (tx) => {
      const capture = await tx.findOneOrFail(Capture, { id: captureId });
      capture.status = 'done';
      tx.create(Verdict, { capture, outcome: 'pass', reason: null, engineVersion: '1.0.0' });
    });
  };
  const get = async (captureId: string, query = '', headers: Record<string, string> = {}, signal?: AbortSignal) => {
    const started = Date.now();
    const res = await fetch(`${api.baseUrl}/api/v1/captures/${captureId}${query}`, { headers: { authorization: `Bearer ${secret.token}`, ...headers }, ...(signal ? { signal } : {}) });
    const text = await res.text();
    return { status: res.status, etag: res.headers.get('etag'), body: text ? JSON.parse(text) : null, ms: Date.now() - started };
  };
  return { api, newCapture, recordVerdict, get };
}

describe('GET /api/v1/captures/:id?wait=N', () => {
  let t: Awaited<ReturnType<typeof setUp>>;
  beforeAll(async () => {
    t = await setUp();
  });
  afterAll(() => t.api.close());

  it('holds the answer until the verdict is committed, then answers it (woken by NOTIFY, not the deadline)', async () => {
    const id = await t.newCapture();
    const waiting = t.get(id, '?wait=20');
    await new Promise((resolve) => setTimeout(resolve, 400));
    await t.recordVerdict(id);
    const res = await waiting;
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id, status: 'done', verdict: { outcome: 'pass', engineVersion: '1.0.0' } });
    expect(res.ms).toBeGreaterThanOrEqual(400);
    expect(res.ms).toBeLessThan(10_000);
  });

  it('answers at once when the verdict is already there', async () => {
    const id = await t.newCapture();
    await t.recordVerdict(id);
    const res = await t.get(id, '?wait=30');
    expect(res.body.verdict.outcome).toBe('pass');
    expect(res.ms).toBeLessThan(10_000);
  });

  it('answers the current state (no verdict) when N seconds pass first', async () => {
    const id = await t.newCapture();
    const res = await t.get(id, '?wait=1');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id, status: 'queued', verdict: null });
    expect(res.ms).toBeGreaterThanOrEqual(950);
  });

  it('without wait answers at once, as before', async () => {
    const id = await t.newCapture();
    const res = await t.get(id);
    expect(res.body).toMatchObject({ id, verdict: null });
  });

  it.each([['31'], ['-1'], ['1.5'], ['soon']])('refuses wait=%s with 422 naming the field', async (wait) => {
    const id = await t.newCapture();
    const res = await t.get(id, `?wait=${wait}`);
    expect(res.status).toBe(422);
    expect(res.body.errors.map((e: { path: string }) => e.path)).toContain('query.wait');
  });

  it('answers 304 to If-None-Match with the current ETag, and 200 with the new body once it changed', async () => {
    const id = await t.newCapture();
    const first = await t.get(id);
    expect(first.etag).toMatch(/^"[A-Za-z0-9_-]{27}"$/);
    const unchanged = await t.get(id, '', { 'if-none-match': first.etag! });
    expect(unchanged.status).toBe(304);
    expect(unchanged.body).toBeNull();
    // A held request whose state did not change in time is a 304 too: nothing to send again.
    expect((await t.get(id, '?wait=1', { 'if-none-match': `W/${first.etag!}` })).status).toBe(304);
    await t.recordVerdict(id);
    const changed = await t.get(id, '', { 'if-none-match': first.etag! });
    expect(changed.status).toBe(200);
    expect(changed.etag).not.toBe(first.etag);
    expect(changed.body.verdict.outcome).toBe('pass');
  });

  it('another project’s token still gets 404, without being held', async () => {
    const other = generateTokenSecret();
    const em = t.api.orm.em.fork();
    em.create(ApiToken, { project: t.api.fixture.otherProject.id, name: 'ci', prefix: other.prefix, secretHash: other.hash, scopes: ['read-verdicts'], createdBy: t.api.fixture.users.admin.id });
    await em.flush();
    const id = await t.newCapture();
    const res = await fetch(`${t.api.baseUrl}/api/v1/captures/${id}?wait=30`, { headers: { authorization: `Bearer ${other.token}` } });
    expect(res.status).toBe(404);
  });
});

describe('held requests are bounded per process, and a client that leaves frees its slot', () => {
  let t: Awaited<ReturnType<typeof setUp>>;
  beforeAll(async () => {
    t = await setUp({ EARMARK_VERDICT_WAIT_MAX_HELD: '1' });
  });
  afterAll(() => t.api.close());

  it('beyond the bound answers at once with the current state', async () => {
    const [a, b] = [await t.newCapture(), await t.newCapture()];
    const held = t.get(a, '?wait=3');
    await new Promise((resolve) => setTimeout(resolve, 300));
    const overflow = await t.get(b, '?wait=3');
    expect(overflow.body.verdict).toBeNull();
    expect(overflow.ms).toBeLessThan(2_000);
    expect((await held).ms).toBeGreaterThanOrEqual(2_900);
  });

  it('a disconnected client releases its slot', async () => {
    const id = await t.newCapture();
    const gone = new AbortController();
    const abandoned = t.get(id, '?wait=30', {}, gone.signal).catch((error: unknown) => error);
    await new Promise((resolve) => setTimeout(resolve, 300));
    gone.abort();
    expect(await abandoned).toBeInstanceOf(Error);
    await new Promise((resolve) => setTimeout(resolve, 200));
    // The one slot is free again: this request is held for its full second.
    expect((await t.get(id, '?wait=1')).ms).toBeGreaterThanOrEqual(950);
  });
});

describe('VerdictWaits', () => {
  const never = new AbortController().signal;

  it('wakes only the waits of the announced capture, counts slots and refuses beyond them', async () => {
    const waits = new VerdictWaits(2, () => true);
    const a = waits.open('a')!;
    const b = waits.open('b')!;
    expect(waits.open('c')).toBeNull();
    expect(waits.held).toBe(2);
    const wokeA = a.until(5_000, never);
    const wokeB = b.until(50, never);
    waits.announce('a');
    expect(await wokeA).toBe('notified');
    expect(await wokeB).toBe('timeout');
    a.release();
    a.release(); // twice frees one slot only
    expect(waits.held).toBe(1);
    b.release();
    expect(waits.held).toBe(0);
  });

  it('keeps an announcement that came between open and until (the read in between)', async () => {
    const waits = new VerdictWaits(1, () => true);
    const w = waits.open('a')!;
    waits.announce('a');
    expect(await w.until(5_000, never)).toBe('notified');
  });

  it('holds nothing while the listener is down, and wakeAll wakes every wait', async () => {
    let listening = false;
    const waits = new VerdictWaits(10, () => listening);
    expect(waits.open('a')).toBeNull();
    listening = true;
    const [x, y] = [waits.open('a')!, waits.open('b')!];
    const woken = Promise.all([x.until(5_000, never), y.until(5_000, never)]);
    waits.wakeAll();
    expect(await woken).toEqual(['notified', 'notified']);
  });

  it('stops waiting when the client goes away', async () => {
    const waits = new VerdictWaits(1, () => true);
    const gone = new AbortController();
    const w = waits.open('a')!;
    const reason = w.until(5_000, gone.signal);
    gone.abort();
    expect(await reason).toBe('aborted');
  });
});
