import { CAPTURE_PURGED, STORAGE_QUOTA_EXCEEDED } from '@earmark/contracts';
import { ApiToken, Build, Capture, CheckResult, MaskRevision, Project, Target, TestCase, Verdict, testCaseSettings } from '@earmark/db';
import { applyRetention, assertWithinQuota, plotKey } from '@earmark/domain';
import { encodeWav } from '@earmark/dsp';
import { generateTokenSecret } from '@earmark/platform';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

const MIB = 1024 * 1024;
const DEFAULT_QUOTA = 2 * MIB;
const DAY = 24 * 3600 * 1000;
let api: TestApi;
let betaToken: string;

const tone = (frames: number) => Float64Array.from({ length: frames }, (_, i) => 0.25 * Math.sin((2 * Math.PI * 997 * i) / 48000));
/** Mono float32 WAV: 4 bytes per frame and a header. */
const wav = (frames: number) => Buffer.from(encodeWav([tone(frames)], 48000, { encoding: 'float', bitsPerSample: 32 }));
/** About 800 kB: two fit the 2 MiB default quota (1.53 MiB), a third does not. */
const upload800k = wav(200_000);

async function uploadToBeta(sha: string, body: Buffer) {
  const res = await fetch(`${api.baseUrl}/api/v1/projects/beta-dsp/builds/${sha}/captures?testCase=tone.997&target=board-a`, {
    method: 'POST',
    headers: { authorization: `Bearer ${betaToken}`, 'content-type': 'audio/wav' },
    body,
  });
  const text = await res.text();
  return { status: res.status, contentType: res.headers.get('content-type') ?? '', body: text ? JSON.parse(text) : null };
}

beforeAll(async () => {
  api = await startTestApi({ EARMARK_PROJECT_QUOTA_BYTES: String(DEFAULT_QUOTA), EARMARK_MAX_CAPTURE_BYTES: String(4 * MIB) });
  const em = api.orm.em.fork();
  const { otherProject, users } = api.fixture;
  em.create(TestCase, { project: otherProject.id, key: 'tone.997', name: 'tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 997, levelDbfs: -12 } });
  em.create(Target, { project: otherProject.id, key: 'board-a', name: 'Board A', sampleRate: 48000 });
  const secret = generateTokenSecret();
  em.create(ApiToken, { project: otherProject.id, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: users.admin.id });
  await em.flush();
  betaToken = secret.token;
});
afterAll(() => api.close());

describe('per-project storage quota', () => {
  it('refuses the upload that would pass the quota with 413, naming used, quota and size in MiB, and stores nothing', async () => {
    expect((await uploadToBeta('0a0a0a01', upload800k)).status).toBe(202);
    expect((await uploadToBeta('0a0a0a02', upload800k)).status).toBe(202);
    const em = api.orm.em.fork();
    const before = { rows: await em.count(Capture, { project: api.fixture.otherProject.id }), objects: (await api.objectStore.list('captures/beta-dsp/')).length };
    expect(before).toEqual({ rows: 2, objects: 2 });

    const refused = await uploadToBeta('0a0a0a03', upload800k);

    expect(refused.status).toBe(413);
    expect(refused.contentType).toMatch(/application\/problem\+json/);
    expect(refused.body).toMatchObject({ type: `https://earmark.dev/problems/${STORAGE_QUOTA_EXCEEDED}`, code: STORAGE_QUOTA_EXCEEDED, status: 413 });
    // 2 × 800,058 bytes stored = 1.5 MiB; the quota 2.0 MiB; the capture 0.8 MiB.
    expect(upload800k.length).toBe(800_058);
    expect(refused.body.detail).toContain('Project beta-dsp stores 1.5 MiB of its 2.0 MiB storage quota; this capture (0.8 MiB) would exceed it');
    const after = { rows: await em.count(Capture, { project: api.fixture.otherProject.id }), objects: (await api.objectStore.list('captures/beta-dsp/')).length };
    expect(after).toEqual(before);
  });

  it('lets an administrator set a project’s quota (0 = unlimited, null = the default); project JSON shows used and quota', async () => {
    const admin = await api.login('admin@example.test');
    const raised = await api.request('PATCH', '/api/projects/beta-dsp', { token: admin, body: { storageQuotaBytes: 4 * MIB } });
    expect(raised.status, raised.text).toBe(200);
    expect(raised.body).toMatchObject({ key: 'beta-dsp', storageUsedBytes: 2 * upload800k.length, storageQuotaBytes: 4 * MIB, storageQuotaSource: 'project' });
    expect((await uploadToBeta('0a0a0a03', upload800k)).status).toBe(202);

    const unlimited = await api.request('PATCH', '/api/projects/beta-dsp', { token: admin, body: { storageQuotaBytes: 0 } });
    expect(unlimited.body).toMatchObject({ storageUsedBytes: 3 * upload800k.length, storageQuotaBytes: null, storageQuotaSource: 'project' });

    const reset = await api.request('PATCH', '/api/projects/beta-dsp', { token: admin, body: { storageQuotaBytes: null } });
    expect(reset.body).toMatchObject({ storageQuotaBytes: DEFAULT_QUOTA, storageQuotaSource: 'default' });
    // Back under the 2 MiB default with 2.3 MiB stored: the next upload is refused again.
    expect((await uploadToBeta('0a0a0a04', upload800k)).status).toBe(413);

    const listed = await api.request('GET', '/api/projects', { token: admin });
    expect(listed.body.items.find((p: { key: string }) => p.key === 'beta-dsp')).toMatchObject({ storageUsedBytes: 3 * upload800k.length, storageQuotaBytes: DEFAULT_QUOTA });

    const bad = await api.request('PATCH', '/api/projects/beta-dsp', { token: admin, body: { storageQuotaBytes: -1 } });
    expect(bad.status).toBe(422);
    expect(bad.body.errors).toEqual([expect.objectContaining({ path: 'body.storageQuotaBytes' })]);
    expect((await api.request('PATCH', '/api/projects/beta-dsp', { token: admin, body: { quota: 5 } })).status).toBe(422);
  });

  it('holds the quota exactly under concurrent uploads: 8 at once into room for 3 store 3, refuse 5 and leave no object behind', async () => {
    const em = api.orm.em.fork();
    const small = wav(4800);
    // Room for three captures and a little, never four.
    const project = em.create(Project, { key: 'gamma-race', name: 'Gamma race', storageQuotaBytes: 3 * small.length + 100 });
    em.create(TestCase, { project, key: 'tone.997', name: 'tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 997, levelDbfs: -12 } });
    em.create(Target, { project, key: 'board-a', name: 'Board A', sampleRate: 48000 });
    const secret = generateTokenSecret();
    em.create(ApiToken, { project, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures'], createdBy: api.fixture.users.admin.id });
    await em.flush();

    const upload = (i: number) =>
      fetch(`${api.baseUrl}/api/v1/projects/gamma-race/builds/0c0c0c0${i}/captures?testCase=tone.997&target=board-a`, {
        method: 'POST',
        headers: { authorization: `Bearer ${secret.token}`, 'content-type': 'audio/wav' },
        body: small,
      }).then(async (res) => ({ status: res.status, body: (await res.json()) as { code?: string } }));
    const answers = await Promise.all(Array.from({ length: 8 }, (_, i) => upload(i)));

    expect(answers.filter((a) => a.status === 202)).toHaveLength(3);
    const refused = answers.filter((a) => a.status === 413);
    expect(refused).toHaveLength(5);
    expect(refused.every((a) => a.body.code === STORAGE_QUOTA_EXCEEDED)).toBe(true);
    const rows = await em.fork().find(Capture, { project: project.id });
    expect(rows).toHaveLength(3);
    // Every stored object has its row: nothing refused was left in the bucket.
    expect((await api.objectStore.list('captures/gamma-race/')).sort()).toEqual(rows.map((r) => r.objectKey).sort());
  });

  it('answers a replay racing its first upload with that capture, not a 413, when the quota has room for one', async () => {
    const em = api.orm.em.fork();
    const small = wav(4800);
    const project = em.create(Project, { key: 'delta-replay', name: 'Delta replay', storageQuotaBytes: small.length + 100 });
    em.create(TestCase, { project, key: 'tone.997', name: 'tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 997, levelDbfs: -12 } });
    em.create(Target, { project, key: 'board-a', name: 'Board A', sampleRate: 48000 });
    const secret = generateTokenSecret();
    em.create(ApiToken, { project, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures'], createdBy: api.fixture.users.admin.id });
    await em.flush();

    // A CI client retrying a slow upload: the same bytes under the same Idempotency-Key, at once.
    const upload = () =>
      fetch(`${api.baseUrl}/api/v1/projects/delta-replay/builds/0d0d0d01/captures?testCase=tone.997&target=board-a`, {
        method: 'POST',
        headers: { authorization: `Bearer ${secret.token}`, 'content-type': 'audio/wav', 'idempotency-key': 'delta-replay-1' },
        body: small,
      }).then(async (res) => ({ status: res.status, body: (await res.json()) as { id?: string; code?: string } }));
    const answers = await Promise.all(Array.from({ length: 4 }, () => upload()));

    expect(answers.map((a) => a.status).sort()).toEqual([200, 200, 200, 202]);
    expect(new Set(answers.map((a) => a.body.id)).size).toBe(1);
    const rows = await em.fork().find(Capture, { project: project.id });
    expect(rows).toHaveLength(1);
    expect(await api.objectStore.list('captures/delta-replay/')).toEqual([rows[0]!.objectKey]);
  });

  it('makes only uploads to the same project wait for the quota lock', async () => {
    const em = api.orm.em.fork();
    const small = wav(4800);
    const made = ['delta-race', 'epsilon-race'].map((key) => {
      const project = em.create(Project, { key, name: key, storageQuotaBytes: 10 * small.length });
      em.create(TestCase, { project, key: 'tone.997', name: 'tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 997, levelDbfs: -12 } });
      em.create(Target, { project, key: 'board-a', name: 'Board A', sampleRate: 48000 });
      const secret = generateTokenSecret();
      em.create(ApiToken, { project, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures'], createdBy: api.fixture.users.admin.id });
      return { project, token: secret.token };
    });
    await em.flush();
    const [delta, epsilon] = made as [(typeof made)[0], (typeof made)[0]];
    const upload = (key: string, token: string, sha: string) =>
      fetch(`${api.baseUrl}/api/v1/projects/${key}/builds/${sha}/captures?testCase=tone.997&target=board-a`, {
        method: 'POST',
        headers: { authorization: `Bearer ${token}`, 'content-type': 'audio/wav' },
        body: small,
      }).then((res) => res.status);
    // Uploads of this file's database waiting for an advisory lock (the shared test cluster holds other databases).
    const waiting = async () =>
      Number((await em.getConnection().execute<{ n: string }[]>(`select count(*) as n from pg_locks where locktype = 'advisory' and not granted and database = (select oid from pg_database where datname = current_database())`))[0]!.n);

    // Another upload to delta-race holds its quota lock, as if between its check and its commit.
    let release!: () => void;
    let locked!: () => void;
    const isLocked = new Promise<void>((resolve) => (locked = resolve));
    const holder = api.orm.em.fork().transactional(async (tx) => {
      await assertWithinQuota(tx, delta.project, small.length, undefined, { locked: true });
      locked();
      await new Promise<void>((resolve) => (release = resolve));
    });
    await isLocked;

    // Another project is not held up.
    expect(await upload('epsilon-race', epsilon.token, '0e0e0e01')).toBe(202);
    // The same project's upload queues behind the lock until it is released.
    const queued = upload('delta-race', delta.token, '0d0d0d01');
    await expect.poll(waiting, { timeout: 15_000 }).toBe(1);
    release();
    await holder;
    expect(await queued).toBe(202);
    expect(await waiting()).toBe(0);
  });

  it('refuses everyone but administrators with 403 (non-members 404)', async () => {
    for (const role of ['qa_manager', 'engineer', 'viewer']) {
      const token = await api.login(`${role}@example.test`);
      const res = await api.request('PATCH', '/api/projects/alpha-dsp', { token, body: { storageQuotaBytes: 0 } });
      expect(res.status, role).toBe(403);
    }
    const outsider = await api.login('outsider@example.test');
    // An engineer of beta-dsp: a member without the permission.
    expect((await api.request('PATCH', '/api/projects/beta-dsp', { token: outsider, body: { storageQuotaBytes: 0 } })).status).toBe(403);
    expect((await api.request('PATCH', '/api/projects/alpha-dsp', { token: outsider, body: { storageQuotaBytes: 0 } })).status).toBe(404);
    const em = api.orm.em.fork();
    expect((await em.findOneOrFail(Project, { key: 'alpha-dsp' })).storageQuotaBytes).toBeNull();
  });
});

describe('a capture whose audio the retention policy removed', () => {
  let captureId = '';
  const base = () => `/api/projects/alpha-dsp/captures/${captureId}`;

  beforeAll(async () => {
    const em = api.orm.em.fork();
    const project = api.fixture.project.id;
    const testCase = em.create(TestCase, { project, key: 'old.tone', name: 'old tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 997, levelDbfs: -12 } });
    const target = em.create(Target, { project, key: 'old-board', name: 'Old board', sampleRate: 48000 });
    const createdAt = new Date(Date.now() - 400 * DAY);
    const build = em.create(Build, { project, sha: '01d01d01', status: 'fail', createdAt });
    const bytes = wav(4800);
    const capture = em.create(Capture, {
      project, build, testCase, target, objectKey: 'captures/alpha-dsp/01d01d01/old.wav', sha256: '0'.repeat(64), sizeBytes: bytes.length,
      format: { container: 'wav' }, sampleRate: 48000, channelCount: 1, frames: 4800, status: 'done', createdAt,
    });
    const mask = em.create(MaskRevision, { testCase, revision: 1, state: 'approved', settings: testCaseSettings(testCase), author: api.fixture.users.qa_manager.id });
    const verdict = em.create(Verdict, { capture, maskRevision: mask, outcome: 'fail', reason: 'level', engineVersion: '1.0.0', createdAt });
    em.create(CheckResult, { verdict, checkId: 'level', kind: 'level', pass: false, measured: -14.5, limit: -13, margin: -1.5 });
    await em.flush();
    captureId = capture.id;
    await api.objectStore.put(capture.objectKey, bytes, 'audio/wav');
    await api.objectStore.put(plotKey({ captureId, maskRevisionId: mask.id, checkId: null, columns: 512, channel: 0 }), Buffer.from('{}'), 'application/json');
  });

  it('answers the capture and residual WAVs and plots with 410 capture-purged; its JSON keeps the verdict and says when', async () => {
    const viewer = await api.login('viewer@example.test');
    expect((await api.request('GET', `${base()}/audio/capture`, { token: viewer })).status).toBe(200);

    const result = await applyRetention(api.orm.em, api.objectStore, pino({ level: 'silent' }), { passedDays: 90, failedDays: 365 });
    expect(result.purged).toBe(1);
    expect(result.plotsDeleted).toBe(1);

    const detail = await api.request('GET', base(), { token: viewer });
    expect(detail.status).toBe(200);
    const purgedAt: string = detail.body.capture.purgedAt;
    expect(new Date(purgedAt).getTime()).toBeGreaterThan(Date.now() - 60_000);
    expect(detail.body.capture.verdict).toMatchObject({ outcome: 'fail', checks: [expect.objectContaining({ id: 'level', measured: -14.5, margin: -1.5 })] });

    const sentence = `The audio of this capture was removed by the retention policy on ${purgedAt.slice(0, 10)}; its verdict is kept.`;
    for (const path of ['/audio/capture', '/audio/residual', '/plot', '/plot?columns=256']) {
      const res = await api.request('GET', `${base()}${path}`, { token: viewer });
      expect(res.status, path).toBe(410);
      expect(res.contentType).toMatch(/application\/problem\+json/);
      expect(res.body).toMatchObject({ type: `https://earmark.dev/problems/${CAPTURE_PURGED}`, code: CAPTURE_PURGED, status: 410, detail: sentence });
    }
    // The stimulus is not the capture's audio: still served.
    expect((await api.request('GET', `${base()}/audio/stimulus`, { token: viewer })).status).toBe(200);
  });

  it('shows purgedAt to CI, and refuses re-evaluating only purged captures with 410', async () => {
    const secret = generateTokenSecret();
    const em = api.orm.em.fork();
    em.create(ApiToken, { project: api.fixture.project.id, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['read-verdicts'], createdBy: api.fixture.users.admin.id });
    await em.flush();
    const ci = await api.request('GET', `/api/v1/captures/${captureId}`, { token: secret.token });
    expect(ci.body.purgedAt).toEqual(expect.stringMatching(/^\d{4}-\d{2}-\d{2}T/));

    const qa = await api.login('qa_manager@example.test');
    const res = await api.request('POST', '/api/projects/alpha-dsp/test-cases/old.tone/masks/1/reevaluate', { token: qa, body: { scope: 'last-n', builds: 5 } });
    expect(res.status, res.text).toBe(410);
    expect(res.body).toMatchObject({ code: CAPTURE_PURGED });
    expect(res.body.detail).toContain('removed by the retention policy; their verdicts are kept');
  });
});
