import { Capture, TestCase, Target, ApiToken } from '@earmark/db';
import { generateTokenSecret } from '@earmark/platform';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

// Hostile uploads are refused from their headers: quickly, with a 422 naming the bound, and
// without storing anything.
let api: TestApi;
let token: string;

function ascii(v: DataView, at: number, s: string): void {
  [...s].forEach((c, i) => v.setUint8(at + i, c.charCodeAt(0)));
}

/** fmt (16-bit mono 48 kHz), `junk` empty JUNK chunks, then a 2-frame data chunk claiming `dataBytes`. */
function wavWith(opts: { junk?: number; bits?: number; dataBytes?: number } = {}): Buffer {
  const junk = opts.junk ?? 0;
  const bits = opts.bits ?? 16;
  const present = 4;
  const bytes = Buffer.alloc(12 + 24 + junk * 8 + 8 + present);
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  ascii(v, 0, 'RIFF');
  v.setUint32(4, bytes.length - 8, true);
  ascii(v, 8, 'WAVE');
  ascii(v, 12, 'fmt ');
  v.setUint32(16, 16, true);
  v.setUint16(20, 1, true);
  v.setUint16(22, 1, true);
  v.setUint32(24, 48000, true);
  v.setUint32(28, (48000 * bits) / 8, true);
  v.setUint16(32, bits / 8, true);
  v.setUint16(34, bits, true);
  let at = 36;
  for (let i = 0; i < junk; i++, at += 8) ascii(v, at, 'JUNK');
  ascii(v, at, 'data');
  v.setUint32(at + 4, opts.dataBytes ?? present, true);
  return bytes;
}

async function upload(body: Buffer) {
  const res = await fetch(`${api.baseUrl}/api/v1/projects/alpha-dsp/builds/ab12cd34ef56/captures?testCase=tone.997&target=board-a`, {
    method: 'POST',
    headers: { authorization: `Bearer ${token}`, 'content-type': 'audio/wav' },
    body,
  });
  return { status: res.status, body: (await res.json()) as { code?: string; detail?: string } };
}

async function storedState() {
  return { rows: await api.orm.em.fork().count(Capture, {}), objects: (await api.objectStore.list('captures/')).length };
}

beforeAll(async () => {
  api = await startTestApi({ EARMARK_MAX_CAPTURE_BYTES: String(4 * 1024 * 1024) });
  const em = api.orm.em.fork();
  const { project, users } = api.fixture;
  em.create(TestCase, { project: project.id, key: 'tone.997', name: 'tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 997, levelDbfs: -12 } });
  em.create(Target, { project: project.id, key: 'board-a', name: 'Board A', sampleRate: 48000 });
  const secret = generateTokenSecret();
  em.create(ApiToken, { project: project.id, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures'], createdBy: users.admin.id });
  await em.flush();
  token = secret.token;
});
afterAll(() => api.close());

describe('upload bounds on hostile captures', () => {
  it('a WAV of 400,000 empty JUNK chunks → 422 too-many-chunks, quickly, nothing stored', async () => {
    const before = await storedState();
    const started = performance.now();
    const res = await upload(wavWith({ junk: 400_000 }));
    const elapsed = performance.now() - started;
    expect(res.status).toBe(422);
    expect(res.body.code).toBe('too-many-chunks');
    expect(res.body.detail).toMatch(/^The WAV file holds more than 64 chunks .*at most 64 chunks/);
    // HTTP and a 3 MB body included, with room for a busy machine; the decoder itself stops after 64 headers
    // (timed in packages/dsp's decode-limits test and the reliability suite).
    expect(elapsed).toBeLessThan(10_000);
    expect(await storedState()).toEqual(before);
  });

  it('a 64 MiB 8-bit mono WAV (67 M samples) → 422 too-many-samples naming the count and the limit', async () => {
    const before = await storedState();
    // The header claims the full 64 MiB; the sample bound is checked before the file length.
    const res = await upload(wavWith({ bits: 8, dataBytes: 64 * 1024 * 1024 }));
    expect(res.status).toBe(422);
    expect(res.body.code).toBe('too-many-samples');
    expect(res.body.detail).toBe(
      'The capture holds 67,108,864 samples (67,108,864 frames × 1 channel(s)); Earmark analyses at most 33,554,432 samples per capture. Upload a shorter capture or fewer channels.',
    );
    expect(await storedState()).toEqual(before);
  });

  it('the same shape within bounds is accepted (the bounds refuse only hostile input)', async () => {
    const res = await upload(wavWith({ junk: 62 }));
    expect(res.status).toBe(202);
  });
});
