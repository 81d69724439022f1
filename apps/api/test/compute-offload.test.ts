import http from 'node:http';
import { ApiToken, Capture, Target, TestCase, Verdict } from '@earmark/db';
import { CapturePlot, JudgingSettings } from '@earmark/contracts';
import { storeDefaultPlot, storedSettingsFor } from '@earmark/domain';
import { ENGINE_VERSION, decodeWav, encodeWav } from '@earmark/dsp';
import { ComputePoolBusyError, generateTokenSecret } from '@earmark/platform';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

let api: TestApi;
let ci: string;
let session: string;

const tone = (seconds: number, hz = 997, rate = 48000) => Float64Array.from({ length: Math.round(seconds * rate) }, (_, i) => 0.25 * Math.sin((2 * Math.PI * hz * i) / rate));
const wav = (channels: Float64Array[]) => Buffer.from(encodeWav(channels, 48000, { encoding: 'float', bitsPerSample: 32 }));

async function upload(sha: string, body: Buffer): Promise<{ id: string }> {
  const res = await fetch(`${api.baseUrl}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=tone&target=board`, {
    method: 'POST',
    headers: { authorization: `Bearer ${ci}`, 'content-type': 'audio/wav' },
    body,
  });
  expect(res.status, await res.clone().text()).toBe(202);
  return (await res.json()) as { id: string };
}

const plot = (id: string, query = '') => api.request('GET', `/api/projects/alpha-dsp/captures/${id}/plot${query}`, { token: session });
/** Tasks the API's compute pool is asked to run, by name, from now on. */
const countTasks = () => {
  const spy = vi.spyOn(api.runtime.compute, 'run');
  return () => spy.mock.calls.map((call) => call[0]);
};

/** Times /api/health again and again while `work` runs; how long each answer took (ms). */
async function healthWhile(work: Promise<unknown>): Promise<number[]> {
  let done = false;
  void work.finally(() => (done = true));
  const took: number[] = [];
  while (!done) {
    const started = performance.now();
    const res = await fetch(`${api.baseUrl}/api/health`);
    expect(res.status).toBe(200);
    await res.arrayBuffer();
    took.push(performance.now() - started);
  }
  await work;
  return took;
}

beforeAll(async () => {
  api = await startTestApi({ EARMARK_MAX_CONCURRENT_UPLOADS: '2' });
  const em = api.orm.em.fork();
  const { project, users } = api.fixture;
  em.create(TestCase, { project: project.id, key: 'tone', name: 'tone', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 1, frequency: 997, levelDbfs: -12 } });
  // 14.4 M samples: about 58 MB of WAV, seconds of generation.
  em.create(TestCase, { project: project.id, key: 'long.multitone', name: 'long multitone', stimulus: { kind: 'multitone', sampleRate: 48000, seconds: 300, from: 50, to: 15000, count: 32, levelDbfs: -20 } });
  em.create(Target, { project: project.id, key: 'board', name: 'Board', sampleRate: 48000 });
  const secret = generateTokenSecret();
  em.create(ApiToken, { project: project.id, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: users.admin.id });
  await em.flush();
  ci = secret.token;
  session = await api.login('viewer@example.test');
}, 60_000);
afterAll(() => api.close());
afterEach(() => vi.restoreAllMocks());

describe('plots are stored and read', () => {
  it('computes a plot once in a thread and serves the stored copy afterwards', async () => {
    const { id } = await upload('a000001', wav([tone(1)]));
    const tasks = countTasks();
    const first = await plot(id, '?columns=256&overlay=none');
    expect(first.status, first.text).toBe(200);
    expect(tasks()).toEqual(['renderPlot']);
    const drawn = CapturePlot.parse(first.body);
    expect(drawn.spectrum.hz.length).toBeLessThanOrEqual(256);
    expect(drawn.engineVersion).toBe(ENGINE_VERSION);
    // The key names the capture, the engine, the mask judged against (none yet), the check drawn
    // (none without a mask), the columns and the channel.
    expect(await api.objectStore.list(`plot-cache/${id}/`)).toEqual([`plot-cache/${id}/${ENGINE_VERSION}-none-none-256-0.json`]);

    const again = await plot(id, '?columns=256&overlay=none');
    expect(again.body).toEqual(first.body);
    // Channel 0 asked for by number is the same stored plot as the default channel.
    expect((await plot(id, '?columns=256&overlay=none&channel=0')).body).toEqual(first.body);
    expect(tasks()).toEqual(['renderPlot']);
  });

  it("overlays the last passing capture's own stored spectrum", async () => {
    const passing = await upload('b000001', wav([tone(1)]));
    const failing = await upload('b000002', wav([tone(1, 1500)]));
    const em = api.orm.em.fork();
    await em.nativeUpdate(Capture, { id: passing.id }, { status: 'done' });
    em.create(Verdict, { capture: passing.id, outcome: 'pass', engineVersion: ENGINE_VERSION });
    await em.flush();

    const tasks = countTasks();
    const res = await plot(failing.id, '?columns=128');
    expect(res.status, res.text).toBe(200);
    const drawn = CapturePlot.parse(res.body);
    expect(drawn.overlay).toMatchObject({ captureId: passing.id, buildSha: 'b000001' });
    // Both plots computed once, and both stored: the overlay is the passing capture's own plot.
    expect(tasks()).toEqual(['renderPlot', 'renderPlot']);
    const own = CapturePlot.parse((await plot(passing.id, '?columns=128&overlay=none')).body);
    expect(drawn.overlay!.spectrum).toEqual(own.spectrum);
    expect(drawn.overlay!.spectrum).not.toEqual(drawn.spectrum);
    expect(tasks()).toHaveLength(2);
  });

  it("serves the default plot the worker stored after its verdict without computing (storeDefaultPlot)", async () => {
    const { id } = await upload('a000002', wav([tone(1)]));
    const row = await api.orm.em.fork().findOneOrFail(Capture, { id }, { populate: ['testCase'] });
    const settings = JudgingSettings.parse(storedSettingsFor(row.testCase, null));
    const audio = decodeWav(new Uint8Array(await api.objectStore.get(row.objectKey)));
    await storeDefaultPlot(api.objectStore, { captureId: id, maskRevisionId: null, settings, checks: [], audio });
    const tasks = countTasks();
    // The page's first request: default columns and channel.
    const res = await plot(id, '?overlay=none');
    expect(res.status, res.text).toBe(200);
    expect(tasks()).toEqual([]);
    expect(CapturePlot.parse(res.body).spectrum.hz.length).toBeGreaterThan(100);
  });

  it('stores a refusal too: a capture that cannot be plotted answers the same 422 at once', async () => {
    const { id } = await upload('c000001', wav([tone(1)]));
    const row = await api.orm.em.fork().findOneOrFail(Capture, { id });
    // The stored bytes turn out unreadable (a decoder bound added after the upload, bit rot).
    await api.objectStore.put(row.objectKey, Buffer.from('RIFF\x04\x00\x00\x00WAVE'), 'audio/wav');
    const tasks = countTasks();
    const first = await plot(id, '?overlay=none');
    expect(first.status).toBe(422);
    expect(first.contentType).toContain('application/problem+json');
    expect(first.body.detail).toMatch(new RegExp(`Capture ${id} cannot be analysed`));
    expect(tasks()).toEqual(['renderPlot']);
    const second = await plot(id, '?overlay=none');
    expect(second.status).toBe(422);
    expect(second.body).toMatchObject({ detail: first.body.detail, code: first.body.code });
    expect(tasks()).toEqual(['renderPlot']);
  });

  it('answers 503 with Retry-After when every compute thread is busy, and stores nothing', async () => {
    const { id } = await upload('d000001', wav([tone(1)]));
    vi.spyOn(api.runtime.compute, 'run').mockRejectedValueOnce(new ComputePoolBusyError('full'));
    const res = await plot(id, '?overlay=none');
    expect(res.status).toBe(503);
    expect(res.headers.get('retry-after')).toBe('2');
    expect(res.contentType).toContain('application/problem+json');
    expect(await api.objectStore.list(`plot-cache/${id}/`)).toEqual([]);
  });

  it('gives a decode refusal in the thread the 422 and code the decoder gives', async () => {
    const res = await fetch(`${api.baseUrl}/api/v1/projects/alpha-dsp/builds/e000001/captures?testCase=tone&target=board`, {
      method: 'POST',
      headers: { authorization: `Bearer ${ci}`, 'content-type': 'audio/wav' },
      body: Buffer.from('RIFF\x04\x00\x00\x00WAVEjunk'),
    });
    expect(res.status).toBe(422);
    expect(((await res.json()) as { code: string }).code).toBe('truncated');
  });
});

describe('the event loop stays free', () => {
  it('refuses, without drawing, a view the worker did not draw of a capture past the plot sample budget', async () => {
    // 2 × 2.4 M samples > 2^22 (EARMARK_API_PLOT_MAX_SAMPLES' default): minutes and gigabytes at the limit of what uploads accept.
    const { id } = await upload('f000002', wav([tone(50, 997), tone(50, 1200)]));
    const tasks = countTasks();
    const res = await plot(id, '?overlay=none&columns=512');
    expect(res.status).toBe(422);
    expect(res.contentType).toContain('application/problem+json');
    expect(res.body).toMatchObject({ code: 'plot-too-large' });
    expect(res.body.detail).toMatch(/has 4,800,000 samples; plots other than the default one are drawn for captures of up to 4,194,304 samples/);
    expect(tasks()).toEqual([]);
  }, 60_000);

  it('answers /api/health quickly while a long capture is plotted', async () => {
    const { id } = await upload('f000001', wav([tone(40, 997), tone(40, 1200)]));
    const took = await healthWhile(plot(id, '?overlay=none').then((res) => expect(res.status, res.text).toBe(200)));
    expect(took.length).toBeGreaterThan(0);
    // Generous (2 shared cores under load): a request needs a few ms; an event loop running the work would hold it for seconds.
    expect(Math.max(...took)).toBeLessThan(1000);
  }, 60_000);

  it('streams a long stimulus generated once in a thread, with health answered meanwhile and memory bounded', async () => {
    const url = `${api.baseUrl}/api/v1/projects/alpha-dsp/test-cases/long.multitone/stimulus.wav`;
    const download = async () => {
      const res = await fetch(url, { headers: { authorization: `Bearer ${ci}` } });
      expect(res.status).toBe(200);
      let bytes = 0;
      for await (const chunk of res.body!) bytes += (chunk as Uint8Array).byteLength;
      return { bytes, length: Number(res.headers.get('content-length')), caution: res.headers.get('x-earmark-caution') };
    };
    const tasks = countTasks();
    let first!: Awaited<ReturnType<typeof download>>;
    const took = await healthWhile(download().then((d) => (first = d)));
    expect(Math.max(...took)).toBeLessThan(1000);
    // 14,400,000 float32 samples and a 58-byte header (IEEE float with a fact chunk).
    expect(first.bytes).toBe(14_400_000 * 4 + 58);
    expect(first.length).toBe(first.bytes);
    expect(first.caution).toMatch(/loud/);
    expect(tasks()).toEqual(['renderStimulusWav']);
    expect((await api.objectStore.list('stimuli/')).length).toBe(1);

    // Later downloads stream the stored file: no generation, and no whole file held in memory.
    global.gc?.();
    const before = process.memoryUsage().rss;
    const second = await download();
    const grown = process.memoryUsage().rss - before;
    expect(second.bytes).toBe(first.bytes);
    expect(tasks()).toEqual(['renderStimulusWav']);
    expect(grown).toBeLessThan(40 * 1024 * 1024);
  }, 120_000);
});

describe('uploads per process are bounded', () => {
  it('refuses an upload past the limit with 503 and Retry-After before reading its body', async () => {
    const body = wav([tone(1)]);
    // Two uploads that send their headers and half their body, then stall.
    const stalled = [0, 1].map((i) => {
      const req = http.request(`${api.baseUrl}/api/v1/projects/alpha-dsp/builds/90000${i}a/captures?testCase=tone&target=board`, {
        method: 'POST',
        headers: { authorization: `Bearer ${ci}`, 'content-type': 'audio/wav', 'content-length': String(body.length) },
      });
      const answer = new Promise<number>((resolve, reject) => {
        req.on('response', (res) => {
          res.resume();
          resolve(res.statusCode!);
        });
        req.on('error', reject);
      });
      req.write(body.subarray(0, body.length / 2));
      return { req, answer };
    });
    let refused: Response | null = null;
    for (let attempt = 0; attempt < 50 && !refused; attempt++) {
      await new Promise((r) => setTimeout(r, 50));
      const res = await fetch(`${api.baseUrl}/api/v1/projects/alpha-dsp/builds/900009a/captures?testCase=tone&target=board`, {
        method: 'POST',
        headers: { authorization: `Bearer ${ci}`, 'content-type': 'audio/wav' },
        body,
      });
      if (res.status === 503) refused = res;
      else expect(res.status).toBe(202); // the stalled ones had not reached the handler yet
    }
    expect(refused?.headers.get('retry-after')).toBe('2');
    expect(refused?.headers.get('content-type')).toContain('application/problem+json');
    expect(((await refused!.json()) as { detail: string }).detail).toMatch(/already receiving 2 captures/);
    for (const { req } of stalled) req.end(body.subarray(body.length / 2));
    expect(await Promise.all(stalled.map((s) => s.answer))).toEqual([202, 202]);
    // With the slots free again, an upload goes through.
    await upload('900010a', body);
  });
});
