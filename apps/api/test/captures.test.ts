import { Build, Capture, Target, TestCase, ApiToken } from '@earmark/db';
import { generateTokenSecret } from '@earmark/platform';
import { QUEUES, RAW_FLOAT32_MEDIA_TYPE } from '@earmark/contracts';
import { decodeWav, encodeWav, generateStimulus } from '@earmark/dsp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

let api: TestApi;
let token: string;
let foreignToken: string;
const SHA = 'ab12cd34ef56';

function tone(frames = 4800, rate = 48000, amplitude = 0.25): Float64Array {
  return Float64Array.from({ length: frames }, (_, i) => amplitude * Math.sin((2 * Math.PI * 997 * i) / rate));
}
const wav = (channels: Float64Array[], rate = 48000, opts?: Parameters<typeof encodeWav>[2]) => Buffer.from(encodeWav(channels, rate, opts));

async function upload(body: Buffer | string | FormData, opts: { query?: string; headers?: Record<string, string>; as?: string } = {}) {
  const headers: Record<string, string> = { authorization: `Bearer ${opts.as ?? token}`, ...opts.headers };
  if (!(body instanceof FormData)) headers['content-type'] ??= 'audio/wav';
  const res = await fetch(`${api.baseUrl}/api/v1/projects/alpha-dsp/builds/${SHA}/captures${opts.query ?? '?testCase=tone.997&target=board-a'}`, {
    method: 'POST',
    headers,
    body,
  });
  const text = await res.text();
  return { status: res.status, headers: res.headers, body: text ? JSON.parse(text) : null };
}

async function storedState() {
  const em = api.orm.em.fork();
  return { rows: await em.count(Capture, {}), objects: (await api.objectStore.list('captures/')).length };
}

beforeAll(async () => {
  // 16 parallel first uploads below race to create one build: all of them must be let in at once.
  api = await startTestApi({ EARMARK_MAX_CAPTURE_BYTES: String(256 * 1024), EARMARK_MAX_CONCURRENT_UPLOADS: '16' });
  const em = api.orm.em.fork();
  const { project, otherProject, users } = api.fixture;
  em.create(TestCase, { project: project.id, key: 'tone.997', name: 'tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 997, levelDbfs: -12 } });
  em.create(TestCase, { project: project.id, key: 'tone.44k', name: 'tone at 44.1 kHz', stimulus: { kind: 'sine', sampleRate: 44100, seconds: 0.1, frequency: 997, levelDbfs: -12 } });
  em.create(TestCase, { project: project.id, key: 'stereo.997', name: 'stereo tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 997, levelDbfs: -12 }, channelMap: [0, 2] });
  em.create(Target, { project: project.id, key: 'board-a', name: 'Board A', sampleRate: 48000 });
  em.create(Target, { project: project.id, key: 'board-b', name: 'Board B', sampleRate: 96000 });
  const secret = generateTokenSecret();
  em.create(ApiToken, { project: project.id, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: users.admin.id });
  const foreign = generateTokenSecret();
  em.create(ApiToken, { project: otherProject.id, name: 'ci', prefix: foreign.prefix, secretHash: foreign.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: users.admin.id });
  await em.flush();
  token = secret.token;
  foreignToken = foreign.token;
});
afterAll(() => api.close());

describe('uploading a capture', () => {
  it('stores a WAV in the object store, writes the row, queues the analysis and answers 202', async () => {
    const bytes = wav([tone(), tone()]);
    const res = await upload(bytes);
    expect(res.status).toBe(202);
    expect(res.body).toMatchObject({ projectKey: 'alpha-dsp', buildSha: SHA, testCase: 'tone.997', target: 'board-a', status: 'queued', channels: 2, frames: 4800, sampleRate: 48000, verdict: null });
    expect(res.headers.get('location')).toBe(res.body.links.self);

    const row = await api.orm.em.fork().findOneOrFail(Capture, { id: res.body.id });
    const stored = await api.objectStore.get(row.objectKey);
    expect(stored.equals(bytes)).toBe(true);
    expect(row.sha256).toBe((await import('node:crypto')).createHash('sha256').update(bytes).digest('hex'));

    const job = await api.boss.fetch<{ captureId: string }>(QUEUES.analyzeCapture);
    expect(job.map((j) => j.data.captureId)).toContain(res.body.id);
  });

  it('accepts multipart uploads and raw little-endian float32 with rate and channel headers', async () => {
    const form = new FormData();
    form.set('testCase', 'tone.997');
    form.set('target', 'board-a');
    form.set('file', new Blob([wav([tone()])], { type: 'audio/wav' }), 'take-1.wav');
    const multipart = await upload(form, { query: '' });
    expect(multipart.status).toBe(202);

    const samples = Float32Array.from(tone(960));
    const raw = await upload(Buffer.from(samples.buffer), { headers: { 'content-type': RAW_FLOAT32_MEDIA_TYPE, 'x-sample-rate': '48000', 'x-channels': '1' } });
    expect(raw.status).toBe(202);
    expect(raw.body.frames).toBe(960);
  });

  it('answers the same Idempotency-Key with the same capture, never a duplicate', async () => {
    const bytes = wav([tone(2400)]);
    const before = await storedState();
    const first = await upload(bytes, { headers: { 'idempotency-key': 'pipeline-77-step-3' } });
    const second = await upload(bytes, { headers: { 'idempotency-key': 'pipeline-77-step-3' } });
    expect(first.status).toBe(202);
    expect(second.status).toBe(200);
    expect(second.body.id).toBe(first.body.id);
    const after = await storedState();
    expect(after.rows - before.rows).toBe(1);
    expect(after.objects - before.objects).toBe(1);
  });

  it('creates the build on the first capture and shows it with its captures', async () => {
    const res = await fetch(`${api.baseUrl}/api/v1/projects/alpha-dsp/builds/${SHA}`, { headers: { authorization: `Bearer ${token}` } });
    const build: any = await res.json();
    expect(res.status).toBe(200);
    expect(build.status).toBe('pending');
    expect(build.captures.length).toBeGreaterThanOrEqual(3);
    expect(build.counts.pending).toBe(build.captures.length);
    const junit = await fetch(build.links.junit.replace(/^https?:\/\/[^/]+/, api.baseUrl), { headers: { authorization: `Bearer ${token}` } });
    expect(junit.status).toBe(200);
    expect(await junit.text()).toContain('<skipped/>');
  });
});

describe('parallel first uploads to a new commit', () => {
  it('all 16 answer 202 and share one build holding 16 captures', async () => {
    const sha = 'fe11a1e1';
    const sends = Array.from({ length: 16 }, (_, i) =>
      fetch(`${api.baseUrl}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=tone.997&target=board-a`, {
        method: 'POST',
        headers: { authorization: `Bearer ${token}`, 'content-type': 'audio/wav' },
        body: wav([tone(480 + i)]),
      }).then(async (res) => ({ status: res.status, text: await res.text() })),
    );
    const answers = await Promise.all(sends);
    expect(answers.filter((a) => a.status !== 202)).toEqual([]);
    const em = api.orm.em.fork();
    const builds = await em.find(Build, { project: api.fixture.project.id, sha });
    expect(builds).toHaveLength(1);
    expect(await em.count(Capture, { build: builds[0]!.id })).toBe(16);
  });
});

describe('bad uploads get a clear 4xx and store nothing', () => {
  const riff = (fmtTag: number, channels: number, bits = 16) => {
    const good = wav([tone(100)], 48000, { bitsPerSample: 16 });
    const copy = Buffer.from(good);
    copy.writeUInt16LE(fmtTag, 20);
    copy.writeUInt16LE(channels, 22);
    copy.writeUInt16LE(bits, 34);
    return copy;
  };
  const nanFloat = () => {
    const f = Float32Array.from(tone(480));
    f[100] = Number.NaN;
    return Buffer.from(f.buffer);
  };

  const cases: { name: string; status: number; send: () => Promise<{ status: number; body: any }>; detail: RegExp; code?: string }[] = [
    { name: 'a truncated WAV', status: 422, send: () => upload(wav([tone()]).subarray(0, 30)), detail: /truncat|shorter|incomplete|header/i },
    { name: 'an unsupported format code', status: 422, send: () => upload(riff(0x55, 1)), detail: /format/i },
    { name: 'zero channels', status: 422, send: () => upload(riff(1, 0)), detail: /channel/i },
    { name: '0 bytes', status: 422, send: () => upload(Buffer.alloc(0)), detail: /empty/i },
    { name: 'a body over the size limit', status: 413, send: () => upload(Buffer.alloc(300 * 1024)), detail: /at most/i },
    { name: 'NaN floats', status: 422, send: () => upload(nanFloat(), { headers: { 'content-type': RAW_FLOAT32_MEDIA_TYPE, 'x-sample-rate': '48000', 'x-channels': '1' } }), detail: /NaN|finite/i },
    { name: 'raw float32 without a sample rate', status: 422, send: () => upload(nanFloat(), { headers: { 'content-type': RAW_FLOAT32_MEDIA_TYPE, 'x-channels': '1' } }), detail: /x-sample-rate/i },
    { name: 'an unknown test case', status: 422, send: () => upload(wav([tone()]), { query: '?testCase=no.such&target=board-a' }), detail: /no test case no\.such/ },
    { name: 'an unknown target', status: 422, send: () => upload(wav([tone()]), { query: '?testCase=tone.997&target=nope' }), detail: /no target nope/ },
    { name: 'no target when the project has several', status: 422, send: () => upload(wav([tone()]), { query: '?testCase=tone.997' }), detail: /several targets/ },
    { name: 'a sample rate the target does not run at', status: 422, send: () => upload(wav([tone()], 44100), { query: '?testCase=tone.997&target=board-b' }), detail: /44100 Hz.*96000 Hz/ },
    {
      name: "a sample rate other than the test case's stimulus",
      status: 422,
      send: () => upload(wav([tone()]), { query: '?testCase=tone.44k&target=board-a' }),
      detail: /^The capture is sampled at 48000 Hz but test case tone\.44k's stimulus is rendered at 44100 Hz\.$/,
      code: 'sample-rate-mismatch',
    },
    {
      name: 'fewer channels than the channel map reads',
      status: 422,
      send: () => upload(wav([tone(), tone()]), { query: '?testCase=stereo.997&target=board-a' }),
      detail: /^The capture has 2 channels but test case stereo\.997's channel map \[0, 2\] reads channel 2 \(counting from 0\), so it needs at least 3\.$/,
      code: 'channel-count-mismatch',
    },
    { name: 'an unsupported media type', status: 415, send: () => upload(Buffer.from('hello'), { headers: { 'content-type': 'text/plain' } }), detail: /audio\/wav/ },
    { name: "another project's token", status: 404, send: () => upload(wav([tone()]), { as: foreignToken }), detail: /^There is no project alpha-dsp, or you have no access to it\.$/ },
  ];

  it.each(cases)('$name → $status', async ({ status, send, detail, code }) => {
    const before = await storedState();
    const res = await send();
    expect(res.status).toBe(status);
    expect(res.body.detail).toMatch(detail);
    if (code) expect(res.body.code).toBe(code);
    expect(await storedState()).toEqual(before);
  });

  it('accepts a capture with exactly the channels the channel map reads', async () => {
    const res = await upload(wav([tone(), tone(), tone()]), { query: '?testCase=stereo.997&target=board-a' });
    expect(res.status).toBe(202);
    expect(res.body.channels).toBe(3);
  });

  it("words a malformed WAV's problem detail for the uploader, naming no internal function", async () => {
    const notWav = await upload(Buffer.from('ID3\u0003 not a wave file at all'));
    expect(notWav.status).toBe(422);
    expect(notWav.body.code).toBe('not-riff');
    expect(notWav.body.detail).toBe('The file is not a WAV file (a WAV file has the bytes "RIFF" at offset 0 and "WAVE" at offset 8).');
    const whole = wav([tone()]);
    const dataAt = whole.indexOf('data');
    const declared = whole.readUInt32LE(dataAt + 4);
    const cut = await upload(whole.subarray(0, whole.length - 1001));
    expect(cut.status).toBe(422);
    expect(cut.body.code).toBe('data-exceeds-file');
    expect(cut.body.detail).toBe(
      `The "data" chunk declares ${declared} bytes but only ${declared - 1001} follow; the file was truncated (an interrupted upload or a writer that never finalised the header).`,
    );
    for (const res of [notWav, cut]) expect(res.body.detail).not.toMatch(/^[a-z][A-Za-z0-9]*: |decodeWav|readRiffChunks/);
  });

  it('a revoked token → 401, nothing stored', async () => {
    const secret = generateTokenSecret();
    const em = api.orm.em.fork();
    em.create(ApiToken, { project: api.fixture.project.id, name: 'old', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures'], createdBy: api.fixture.users.admin.id, revokedAt: new Date() });
    await em.flush();
    const before = await storedState();
    const res = await upload(wav([tone()]), { as: secret.token });
    expect(res.status).toBe(401);
    expect(await storedState()).toEqual(before);
  });
});

describe('object store outage', () => {
  it('answers 503 with Retry-After and stores no row; after restart the retry succeeds', async () => {
    const bytes = wav([tone(1200)]);
    const before = await storedState();
    await api.s3.stop();
    const failed = await upload(bytes, { headers: { 'idempotency-key': 'outage-1' } });
    expect(failed.status).toBe(503);
    expect(failed.headers.get('retry-after')).toBe('5');
    expect(await api.orm.em.fork().count(Capture, {})).toBe(before.rows);
    await api.s3.restart();
    const retried = await upload(bytes, { headers: { 'idempotency-key': 'outage-1' } });
    expect(retried.status).toBe(202);
    expect(await storedState()).toEqual({ rows: before.rows + 1, objects: before.objects + 1 });
  });
});

describe('test cases and stimuli', () => {
  it('creates a test case with a validated stimulus and serves the exact stimulus as WAV', async () => {
    const engineer = await api.login('engineer@example.test');
    const spec = { kind: 'sweep', sampleRate: 48000, seconds: 0.5, from: 50, to: 15000, levelDbfs: -12 };
    const created = await api.request('POST', '/api/projects/alpha-dsp/test-cases', { token: engineer, body: { key: 'eq.sweep', name: 'Sweep', stimulus: spec } });
    expect(created.status).toBe(201);
    expect(created.body.stimulus).toMatchObject({ ...spec, silenceSeconds: 0, fadeInSeconds: 0 });

    const res = await fetch(`${api.baseUrl}/api/v1/projects/alpha-dsp/test-cases/eq.sweep/stimulus.wav`, { headers: { authorization: `Bearer ${token}` } });
    expect(res.status).toBe(200);
    expect(res.headers.get('x-earmark-caution')).toMatch(/loud/);
    const decoded = decodeWav(new Uint8Array(await res.arrayBuffer()));
    const expected = generateStimulus(created.body.stimulus);
    expect(decoded.frames).toBe(expected.channels[0]!.length);
    // 32-bit float WAV: every sample equals the generated one rounded to float32.
    const got = decoded.channels[0]!;
    const want = expected.channels[0]!;
    for (let i = 0; i < want.length; i += 97) expect(got[i]).toBe(Math.fround(want[i]!));
  });

  it('rejects a stimulus failing its schema, naming the field', async () => {
    const engineer = await api.login('engineer@example.test');
    const res = await api.request('POST', '/api/projects/alpha-dsp/test-cases', {
      token: engineer,
      body: { key: 'bad.sine', name: 'Bad', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 1, frequency: 30000 } },
    });
    expect(res.status).toBe(422);
    expect(res.body.errors.map((e: { path: string }) => e.path)).toContain('body.stimulus.frequency');
  });

  it('refuses to change the stimulus of a test case that has captures', async () => {
    const engineer = await api.login('engineer@example.test');
    const res = await api.request('PATCH', '/api/projects/alpha-dsp/test-cases/tone.997', {
      token: engineer,
      body: { stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 1000, levelDbfs: -12 } },
    });
    expect(res.status).toBe(409);
    const rename = await api.request('PATCH', '/api/projects/alpha-dsp/test-cases/tone.997', { token: engineer, body: { name: 'Tone, 997 Hz' } });
    expect(rename.status).toBe(200);
    expect(rename.body.name).toBe('Tone, 997 Hz');
  });
});
