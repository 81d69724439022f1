import { Build, MaskRevision, Target, TestCase, TEST_PASSWORD, testCaseSettings } from '@earmark/db';
import { CapturePlot, StimulusSpec, type BuildMatrix, type BuildsPage, type CaptureDetail, type CaptureDto, type FindingsPage, type MaskCheckInput } from '@earmark/contracts';
import { decodeWav, encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import { applyBiquad, delay, peakingEqCoefficients } from '@earmark/dsp/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startStack, type Stack } from '../support/stack.js';
import { waitFor } from '../support/wait-for.js';

/** The dashboard's reads over verdicts made by the real worker. */
let stack: Stack;
let session: string;
const FS = 48000;
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 1, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.2 });
const stimulus = stimulusAsPlayed(spec).channels[0]!;
const mask: MaskCheckInput[] = [
  { id: 'response', kind: 'magnitude-envelope', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 100, db: -1 }, { hz: 16000, db: -1 }] },
];

async function call<T>(path: string, init: RequestInit & { token?: string } = {}): Promise<{ status: number; body: T }> {
  const res = await fetch(`${stack.url}${path}`, { ...init, headers: { authorization: `Bearer ${init.token ?? session}`, 'content-type': 'application/json', ...(init.headers ?? {}) } });
  const text = await res.text();
  return { status: res.status, body: (text && res.headers.get('content-type')?.includes('json') ? JSON.parse(text) : text) as T };
}

async function submit(sha: string, branch: string, samples: Float64Array): Promise<CaptureDto> {
  await call('/api/v1/projects/alpha-dsp/builds', { method: 'POST', token: stack.ciToken, body: JSON.stringify({ sha, branch }) });
  const res = await fetch(`${stack.url}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=eq&target=board`, {
    method: 'POST',
    headers: { authorization: `Bearer ${stack.ciToken}`, 'content-type': 'audio/wav' },
    body: Buffer.from(encodeWav([samples], FS, { encoding: 'float', bitsPerSample: 32 })),
  });
  const capture = (await res.json()) as CaptureDto;
  return waitFor(
    async () => {
      const now = (await call<CaptureDto>(`/api/v1/captures/${capture.id}`, { token: stack.ciToken })).body;
      return now.verdict ? now : null;
    },
    { what: `a verdict for capture ${capture.id} of ${sha}`, timeoutMs: 30_000, intervalMs: 150 },
  );
}

let passing: CaptureDto;
let failing: CaptureDto;
beforeAll(async () => {
  stack = await startStack();
  const em = stack.orm.em.fork();
  const project = stack.fixture.project.id;
  em.create(Target, { project, key: 'board', name: 'Board', sampleRate: FS });
  const eq = em.create(TestCase, { project, key: 'eq', name: 'EQ sweep', stimulus: spec });
  em.create(MaskRevision, { testCase: eq, revision: 1, state: 'approved', checks: mask, settings: testCaseSettings(eq), author: stack.fixture.users.engineer.id });
  await em.flush();
  await stack.startWorker();
  const login = await fetch(`${stack.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'engineer@example.test', password: TEST_PASSWORD }) });
  session = ((await login.json()) as { accessToken: string }).accessToken;
  passing = await submit('1111aaa', 'main', delay(stimulus, 20));
  failing = await submit('2222bbb', 'main', applyBiquad(delay(stimulus, 20), peakingEqCoefficients(FS, 8000, 2, 2)));
  // Older builds on another branch, for paging and filters (no captures).
  for (let i = 0; i < 12; i++) em.create(Build, { project, sha: `99${i.toString(16).padStart(5, '0')}`, branch: 'release', status: 'pass', createdAt: new Date(Date.now() - (i + 1) * 86_400_000) });
  await em.flush();
}, 120_000);
afterAll(() => stack?.close());

describe('dashboard API', () => {
  it('pages, sorts and filters builds on the server with verdict counts', async () => {
    const first = (await call<BuildsPage>('/api/projects/alpha-dsp/builds?pageSize=5')).body;
    expect(first.total).toBe(14);
    expect(first.items.map((b) => b.sha).slice(0, 2)).toEqual(['2222bbb', '1111aaa']);
    expect(first.items[0]!.counts).toEqual({ pass: 0, fail: 1, error: 0, pending: 0, waived: 0 });
    const third = (await call<BuildsPage>('/api/projects/alpha-dsp/builds?pageSize=5&page=3')).body;
    expect(third.items).toHaveLength(4);
    const main = (await call<BuildsPage>('/api/projects/alpha-dsp/builds?branch=main&sort=createdAt')).body;
    expect(main.items.map((b) => b.sha)).toEqual(['1111aaa', '2222bbb']);
    expect((await call<BuildsPage>('/api/projects/alpha-dsp/builds?status=fail')).body.items.map((b) => b.sha)).toEqual(['2222bbb']);
    expect((await call<BuildsPage>('/api/projects/alpha-dsp/builds?sha=22')).body.total).toBe(1);
    expect((await call<BuildsPage>('/api/projects/alpha-dsp/builds?target=board')).body.total).toBe(2);
    const bad = await call<{ errors: { path: string }[] }>('/api/projects/alpha-dsp/builds?sort=sideways');
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0]!.path).toBe('query.sort');
  });

  it('shows the build matrix compared with the previous build on the branch', async () => {
    const matrix = (await call<BuildMatrix>('/api/projects/alpha-dsp/builds/2222bbb/matrix')).body;
    expect(matrix.compared?.sha).toBe('1111aaa');
    expect(matrix.cells).toHaveLength(1);
    const cell = matrix.cells[0]!;
    expect(cell).toMatchObject({ testCase: 'eq', target: 'board', outcome: 'fail', previous: 'pass', captureId: failing.id });
    expect(cell.failing[0]!.id).toBe('response');
    expect(cell.failing[0]!.margin!).toBeLessThan(0);
  });

  it('gives the capture page its details, with the last passing capture', async () => {
    const detail = (await call<CaptureDetail>(`/api/projects/alpha-dsp/captures/${failing.id}`)).body;
    expect(detail.lastPassing?.captureId).toBe(passing.id);
    expect(detail.mask?.revision).toBe(1);
    expect(detail.findings.map((f) => f.checkId)).toEqual(['response']);
    expect(detail.build.sha).toBe('2222bbb');
  });

  it('serves decimated plot data with the mask, the worst point near 8 kHz and the passing overlay', async () => {
    const res = await call<unknown>(`/api/projects/alpha-dsp/captures/${failing.id}/plot?columns=512`);
    expect(res.status).toBe(200);
    const plot = CapturePlot.parse(res.body);
    expect(plot.spectrum.hz.length).toBeLessThanOrEqual(512);
    expect(plot.upper).toEqual([{ hz: 100, db: 1 }, { hz: 16000, db: 1 }]);
    expect(plot.worst!.hz).toBeGreaterThan(7600);
    expect(plot.worst!.hz).toBeLessThan(8400);
    expect(plot.worst!.margin).toBeCloseTo(-1, 0);
    expect(plot.failingRegions.length).toBeGreaterThan(0);
    expect(plot.overlay?.captureId).toBe(passing.id);
    expect(plot.phase!.hz.length).toBeGreaterThan(10);
    // A pure delay of 20 samples: group delay 20/48000 s ≈ 0.417 ms across the band (definition of group delay).
    const mid = plot.groupDelay!.ms[Math.floor(plot.groupDelay!.ms.length / 2)]!;
    expect(mid).toBeGreaterThan(0.3);
    expect(mid).toBeLessThan(0.6);
    expect(plot.waveform.seconds.length).toBeLessThanOrEqual(512);

    // The plot is stored under a key naming what it depends on (capture, mask revision, engine,
    // check drawn, columns, channel): the worker stored the default one (1024 columns) with the
    // verdict, the view added the 512-column one; the overlay is the passing capture's own stored plot.
    const mask = (await call<CaptureDetail>(`/api/projects/alpha-dsp/captures/${failing.id}`)).body.mask!;
    expect(plot.checkId).toBe('response');
    expect(await stack.objectStore.list(`plot-cache/${failing.id}/`)).toEqual([1024, 512].map((columns) => `plot-cache/${failing.id}/${plot.engineVersion}-${mask.id}-response-${columns}-0.json`));
    expect(await stack.objectStore.list(`plot-cache/${passing.id}/`)).toHaveLength(2);
    const again = await call<unknown>(`/api/projects/alpha-dsp/captures/${failing.id}/plot?columns=512`);
    expect(again.body).toEqual(res.body);
  });

  it('draws the level spectrum when the capture misses most of the stimulus (the verdict says why)', async () => {
    // Half the stimulus arrives after the capture ended: no transfer function can be estimated.
    const late = new Float64Array(stimulus.length);
    late.set(stimulus.subarray(0, stimulus.length / 2), stimulus.length / 2);
    const lost = await submit('3333ccc', 'late', late);
    expect(lost.verdict!.outcome).toBe('error');
    expect(lost.verdict!.reason).toMatch(/does not hold the whole stimulus/);
    const res = await call<unknown>(`/api/projects/alpha-dsp/captures/${lost.id}/plot?columns=256`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const plot = CapturePlot.parse(res.body);
    expect(plot.unit).toBe('dBFS');
    expect(plot.checkId).toBeNull();
    expect(plot.upper).toBeNull();
    expect(plot.phase).toBeNull();
    expect(plot.spectrum.hz.length).toBeGreaterThan(100);
  });

  it('serves capture, stimulus and residual audio; the residual of a pure delay is near silence', async () => {
    const get = async (kind: string) => {
      const res = await fetch(`${stack.url}/api/projects/alpha-dsp/captures/${passing.id}/audio/${kind}`, { headers: { authorization: `Bearer ${session}` } });
      expect(res.headers.get('x-earmark-caution')).toMatch(/loud/);
      return decodeWav(new Uint8Array(await res.arrayBuffer()));
    };
    const capture = await get('capture');
    const stim = await get('stimulus');
    const residual = await get('residual');
    const rms = (x: Float64Array) => Math.sqrt(x.reduce((s, v) => s + v * v, 0) / x.length);
    expect(stim.frames).toBe(stimulus.length);
    // Capture − aligned stimulus: the delay is removed exactly, so the residual sits far below the signal.
    expect(20 * Math.log10(rms(residual.channels[0]!) / rms(capture.channels[0]!))).toBeLessThan(-60);
  });

  it('triages findings: assign, change state, bulk, comment; viewers may not', async () => {
    // Findings are kept per branch: main's one (the 'late' branch keeps its own).
    const list = (await call<FindingsPage>('/api/projects/alpha-dsp/findings?state=active&branch=main')).body;
    expect(list.total).toBe(1);
    expect(list.items[0]).toMatchObject({ branch: 'main', buildSha: '2222bbb', occurrences: 1, firstSeen: { sha: '2222bbb' }, failingSince: { sha: '2222bbb' } });
    const id = list.items[0]!.id;
    const engineer = stack.fixture.users.engineer.id;
    const assigned = await call<{ assignee: { id: string }; state: string }>(`/api/projects/alpha-dsp/findings/${id}`, { method: 'PATCH', body: JSON.stringify({ assigneeId: engineer, state: 'investigating' }) });
    expect(assigned.status).toBe(200);
    expect(assigned.body).toMatchObject({ state: 'investigating', assignee: { id: engineer } });
    expect((await call<FindingsPage>('/api/projects/alpha-dsp/findings?assignee=me')).body.total).toBe(1);
    const outsider = await call(`/api/projects/alpha-dsp/findings/${id}`, { method: 'PATCH', body: JSON.stringify({ assigneeId: stack.fixture.users.outsider.id }) });
    expect(outsider.status).toBe(422);

    const comment = await call<{ body: string }>(`/api/projects/alpha-dsp/findings/${id}/comments`, { method: 'POST', body: JSON.stringify({ body: 'Bump comes from the new shelf filter; see commit 2222bbb.' }) });
    expect(comment.status).toBe(201);
    expect((await call<{ items: unknown[] }>(`/api/projects/alpha-dsp/findings/${id}/comments`)).body.items).toHaveLength(1);

    const bulk = await call<{ items: { state: string }[] }>('/api/projects/alpha-dsp/findings/bulk', { method: 'POST', body: JSON.stringify({ ids: [id], state: 'fixed' }) });
    expect(bulk.body.items[0]!.state).toBe('fixed');

    const viewerLogin = await fetch(`${stack.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'viewer@example.test', password: TEST_PASSWORD }) });
    const viewer = ((await viewerLogin.json()) as { accessToken: string }).accessToken;
    expect((await call(`/api/projects/alpha-dsp/findings/${id}`, { method: 'PATCH', token: viewer, body: JSON.stringify({ state: 'open' }) })).status).toBe(403);
  });
});
