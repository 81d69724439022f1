import { CaptureDetail, JudgingSettings, MaskCheck, QUEUES, capturePlotSelection, type CapturePlot } from '@earmark/contracts';
import { AuditEvent, Build, Capture, MaskRevision, Target, TestCase, Verdict, testCaseSettings } from '@earmark/db';
import { createLinks, errorJudgement, judgeCapture, maskInForce, recordVerdict, renderDefaultPlot, storedSettingsFor, writeStoredPlot } from '@earmark/domain';
import { ENGINE_VERSION, decodeWav, encodeWav } from '@earmark/dsp';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

/**
 * The capture page's API: plots of any spectral check (envelopes as curves, band levels as
 * steps), the worst channel of each check, the capture as uploaded, and "analyse again".
 */
let api: TestApi;
let captureId = '';
const SHA = 'c0ffee12';
const base = () => `/api/projects/alpha-dsp/captures/${captureId}`;
const rate = 48000;
const tone = (amplitude: number) => Float64Array.from({ length: 9600 }, (_, i) => amplitude * Math.sin((2 * Math.PI * 997 * i) / rate));
// Channel 1 is 6 dB louder than channel 0: only it breaks the tight envelope.
const uploaded = Buffer.from(encodeWav([tone(0.25), tone(0.5)], rate));

const CHECKS = [
  { id: 'env-wide', kind: 'magnitude-envelope', measure: 'level', upper: [{ hz: 100, db: 0 }, { hz: 10000, db: 0 }] },
  { id: 'env-tight', kind: 'magnitude-envelope', measure: 'level', upper: [{ hz: 200, db: -10.5 }, { hz: 5000, db: -10.5 }] },
  { id: 'bands', kind: 'band-levels', measure: 'level', fraction: 3, bands: [{ centerHz: 500, max: -20 }, { centerHz: 1000, min: -80, max: -30 }] },
  { id: 'peak', kind: 'level', metric: 'peak-dbfs', max: 0 },
];

beforeAll(async () => {
  api = await startTestApi();
  const em = api.orm.em.fork();
  const project = api.fixture.project.id;
  const testCase = em.create(TestCase, { project, key: 'tone.pair', name: 'tone pair', stimulus: { kind: 'sine', sampleRate: rate, seconds: 0.2, frequency: 997, levelDbfs: -12 }, channelMap: [0, 1] });
  const target = em.create(Target, { project, key: 'pair-board', name: 'Pair board', sampleRate: rate });
  em.create(MaskRevision, { testCase, revision: 1, state: 'approved', settings: testCaseSettings(testCase), checks: CHECKS, author: api.fixture.users.qa_manager.id });
  const build = em.create(Build, { project, sha: SHA, status: 'running' });
  const capture = em.create(Capture, {
    project, build, testCase, target, objectKey: `captures/alpha-dsp/${SHA}/pair.wav`, sha256: '0'.repeat(64), sizeBytes: uploaded.length,
    format: { container: 'wav' }, sampleRate: rate, channelCount: 2, frames: 9600, status: 'analysing',
  });
  await em.flush();
  captureId = capture.id;
  await api.objectStore.put(capture.objectKey, uploaded, 'audio/wav');
  // What the worker does: judge under the revision in force and record the verdict.
  const judging = api.orm.em.fork();
  const row = await judging.findOneOrFail(Capture, { id: captureId }, { populate: ['project', 'build', 'testCase', 'target'] });
  const mask = await maskInForce(judging, row.testCase, row.target);
  expect((await recordVerdict(judging, captureId, mask, judgeCapture(new Uint8Array(uploaded), row, mask), createLinks('http://earmark.test'))).written).toBe(true);
});
afterAll(() => api.close());

const plot = async (query: string): Promise<CapturePlot> => {
  const viewer = await api.login('viewer@example.test');
  const res = await api.request('GET', `${base()}/plot?${query}`, { token: viewer });
  expect(res.status, res.text).toBe(200);
  return res.body as CapturePlot;
};

describe('the checks of a verdict', () => {
  it('name the channel that set each check’s numbers, so the page can open on the worst', async () => {
    const viewer = await api.login('viewer@example.test');
    const detail = await api.request('GET', base(), { token: viewer });
    expect(detail.body.capture.verdict.outcome).toBe('fail');
    const checks = Object.fromEntries((detail.body.capture.verdict.checks as Array<{ id: string; margin: number }>).map((c) => [c.id, c]));
    expect(checks['env-wide']).toMatchObject({ pass: true });
    expect(checks['env-tight']).toMatchObject({ pass: false, channel: 1 });
    expect(checks['env-tight']!.margin).toBeLessThan(0);
    expect(checks.bands).toMatchObject({ pass: false });
  });
});

describe('the view a capture opens on', () => {
  it('is one rule: the API’s default plot, the worker’s stored plot and the web’s first view all show the worst failing check on its worst channel', async () => {
    const viewer = await api.login('viewer@example.test');
    const detail = CaptureDetail.parse((await api.request('GET', base(), { token: viewer })).body);
    // The web's capture page opens on this (apps/web utils/plot-selection.ts calls the same function).
    const web = capturePlotSelection(detail);
    // env-wide (the mask's first) passes; the worst failing spectral check is a later one, on channel 1.
    const failing = detail.capture.verdict!.checks.filter((c) => !c.pass && (c.kind === 'magnitude-envelope' || c.kind === 'band-levels'));
    const worst = failing.reduce((a, b) => (b.margin! < a.margin! ? b : a));
    expect(web).toEqual({ checkId: worst.id, channel: worst.channel });
    expect(web.checkId).not.toBe('env-wide');

    // What the worker's analysis thread stores after the verdict: the plot chosen from the verdict's checks.
    const em = api.orm.em.fork();
    const row = await em.findOneOrFail(Capture, { id: captureId }, { populate: ['project', 'build', 'testCase', 'target'] });
    const mask = await maskInForce(em, row.testCase, row.target);
    const judgement = judgeCapture(new Uint8Array(uploaded), row, mask);
    const settings = JudgingSettings.parse(storedSettingsFor(row.testCase, mask));
    const checks = (mask?.checks ?? []).map((c) => MaskCheck.parse(c));
    const worker = renderDefaultPlot({ captureId, maskRevisionId: mask!.id, settings, checks, audio: decodeWav(new Uint8Array(uploaded)), verdictChecks: judgement.checks });
    expect({ checkId: worker.identity.checkId, channel: worker.identity.channel }).toEqual(web);
    await writeStoredPlot(api.objectStore, worker.identity, worker.stored);

    // The page's first request names neither check nor channel: the API answers the stored plot, drawing nothing.
    const spy = vi.spyOn(api.runtime.compute, 'run');
    const res = await api.request('GET', `${base()}/plot?overlay=none`, { token: viewer });
    expect(res.status, res.text).toBe(200);
    expect(spy).not.toHaveBeenCalled();
    spy.mockRestore();
    expect({ checkId: res.body.checkId, channel: res.body.channel }).toEqual(web);
    expect(res.body.failingRegions.length).toBeGreaterThan(0);
    // A check asked for without a channel opens on that check's worst channel, as the page's check picker does.
    const tight = await plot('columns=256&overlay=none&check=env-tight');
    expect(tight.channel).toBe(1);
  });
});

describe('plots of a chosen spectral check', () => {
  it('draws the check asked for with its own limits', async () => {
    const first = await plot('columns=256&channel=1&overlay=none&check=env-wide');
    expect(first).toMatchObject({ checkId: 'env-wide', checkKind: 'magnitude-envelope', measure: 'level', normalisedAtHz: null, unit: 'dBFS', bands: null, failingRegions: [] });
    expect(first.upper).toEqual([{ hz: 100, db: 0 }, { hz: 10000, db: 0 }]);

    const tightOnOne = await plot('columns=256&channel=1&overlay=none&check=env-tight');
    expect(tightOnOne.checkId).toBe('env-tight');
    expect(tightOnOne.upper).toEqual([{ hz: 200, db: -10.5 }, { hz: 5000, db: -10.5 }]);
    expect(tightOnOne.failingRegions.length).toBeGreaterThan(0);
    expect(tightOnOne.worst?.margin).toBeLessThan(0);
    expect(tightOnOne.worst?.hz).toBeGreaterThan(900);
    expect(tightOnOne.worst?.hz).toBeLessThan(1100);

    // The quieter channel passes the same envelope: no failing region.
    const tightOnZero = await plot('columns=256&channel=0&overlay=none&check=env-tight');
    expect(tightOnZero.failingRegions).toEqual([]);
    expect(tightOnZero.worst).toBeNull();
  });

  it('draws a band-levels check as bands with edges, measured levels and limits; a failing band is a failing region', async () => {
    const bands = await plot('columns=256&channel=0&overlay=none&check=bands');
    expect(bands).toMatchObject({ checkId: 'bands', checkKind: 'band-levels', upper: null, lower: null, unit: 'dBFS', measure: 'level' });
    expect(bands.bands).toHaveLength(2);
    const [b500, b1k] = bands.bands!;
    expect(b500).toMatchObject({ nominalHz: 500, max: -20, min: null, error: null });
    expect(b1k).toMatchObject({ nominalHz: 1000, max: -30, min: -80, error: null });
    // IEC 61260-1 base-10 third-octave edges of the 1 kHz band.
    expect(b1k!.lowerHz).toBeCloseTo(891.25, 1);
    expect(b1k!.upperHz).toBeCloseTo(1122.0, 0);
    expect(b1k!.measured).toBeGreaterThan(-30);
    expect(b1k!.margin).toBeCloseTo(-30 - b1k!.measured!, 9);
    expect(bands.failingRegions).toEqual([{ fromHz: b1k!.lowerHz, toHz: b1k!.upperHz, worstHz: 1000, worstMargin: b1k!.margin }]);
    expect(bands.worst?.margin).toBe(b1k!.margin);
  });

  it('answers 422 in words for a check that is not a spectral check of the mask', async () => {
    const viewer = await api.login('viewer@example.test');
    for (const check of ['peak', 'no-such-check']) {
      const res = await api.request('GET', `${base()}/plot?check=${check}`, { token: viewer });
      expect(res.status, check).toBe(422);
      expect(res.contentType).toMatch(/problem\+json/);
      expect(res.body.detail).toBe(`Check "${check}" is not a spectral check of the mask capture ${captureId} was judged against; its spectral checks are env-wide, env-tight, bands.`);
    }
    expect((await api.request('GET', `${base()}/plot?check=Not%20A%20Slug`, { token: viewer })).status).toBe(422);
  });
});

describe('downloading the capture', () => {
  it('answers the bytes exactly as uploaded, as an attachment named after the test case, target and build', async () => {
    const viewer = await api.login('viewer@example.test');
    const res = await fetch(`${api.baseUrl}${base()}/download`, { headers: { authorization: `Bearer ${viewer}` } });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('audio/wav');
    expect(res.headers.get('content-disposition')).toBe('attachment; filename="tone.pair_pair-board_c0ffee1.wav"');
    expect(Buffer.from(await res.arrayBuffer()).equals(uploaded)).toBe(true);
  });
});

describe('analysing a capture again', () => {
  it('is refused to viewers (403) and answers 404 for a capture of another project', async () => {
    const viewer = await api.login('viewer@example.test');
    const res = await api.request('POST', `${base()}/reanalyse`, { token: viewer });
    expect(res.status).toBe(403);
    const engineer = await api.login('engineer@example.test');
    expect((await api.request('POST', `/api/projects/alpha-dsp/captures/${crypto.randomUUID()}/reanalyse`, { token: engineer })).status).toBe(404);
  });

  it('queues the capture with a request id, audits who asked, and refuses a second request while it waits (409)', async () => {
    const engineer = await api.login('engineer@example.test');
    const res = await api.request('POST', `${base()}/reanalyse`, { token: engineer });
    expect(res.status, res.text).toBe(202);
    expect(res.body).toMatchObject({ captureId, status: 'queued', reanalysisId: expect.any(String) });
    const em = api.orm.em.fork();
    expect((await em.findOneOrFail(Capture, { id: captureId })).status).toBe('queued');
    // The build is judged again too: its only capture waits, so it is pending until the verdict.
    expect((await em.findOneOrFail(Build, { sha: SHA })).status).toBe('pending');
    const audit = await em.find(AuditEvent, { action: 'capture.reanalyse', subject: `capture:${captureId}` });
    expect(audit.map((a) => [a.actor, a.details])).toEqual([['user:engineer@example.test', { reanalysisId: res.body.reanalysisId, statusBefore: 'done' }]]);
    const jobs = await api.boss.fetch<{ captureId: string; reanalysisId?: string }>(QUEUES.analyzeCapture);
    expect(jobs.map((j) => j.data)).toContainEqual({ captureId, reanalysisId: res.body.reanalysisId });

    const again = await api.request('POST', `${base()}/reanalyse`, { token: engineer });
    expect(again.status).toBe(409);
    expect(again.body.detail).toBe(`Capture ${captureId} is already waiting to be analysed; its page shows the new verdict when it is ready.`);
  });

  it('writes one new verdict per request even under the same revision and engine', async () => {
    const em = api.orm.em.fork();
    const mask = await em.findOneOrFail(MaskRevision, { testCase: { key: 'tone.pair' }, revision: 1 });
    const links = createLinks('http://earmark.test');
    const judgement = errorJudgement('The stored capture cannot be read: test outage', ENGINE_VERSION);
    // A plain re-run of the first job (say the sweep re-queued it after the request's job was lost)
    // writes nothing, and the capture shows its newest verdict again instead of waiting for ever.
    expect((await api.orm.em.fork().findOneOrFail(Capture, { id: captureId })).status).toBe('queued');
    expect((await recordVerdict(api.orm.em.fork(), captureId, mask, judgement, links)).written).toBe(false);
    expect((await api.orm.em.fork().findOneOrFail(Capture, { id: captureId })).status).toBe('done');
    expect((await api.orm.em.fork().findOneOrFail(Build, { sha: SHA })).status).toBe('fail');
    // The person's request writes once.
    const id = crypto.randomUUID();
    expect((await recordVerdict(api.orm.em.fork(), captureId, mask, judgement, links, { reanalysisId: id })).written).toBe(true);
    expect((await recordVerdict(api.orm.em.fork(), captureId, mask, judgement, links, { reanalysisId: id })).written).toBe(false);
    expect(await api.orm.em.fork().count(Verdict, { capture: captureId })).toBe(2);

    const viewer = await api.login('viewer@example.test');
    const detail = await api.request('GET', base(), { token: viewer });
    expect(detail.body.capture).toMatchObject({ status: 'error', verdict: { outcome: 'error', reason: 'The stored capture cannot be read: test outage', previousOutcome: 'fail' } });
    // The build matrix says why the cell is an error.
    const matrix = await api.request('GET', `/api/projects/alpha-dsp/builds/${SHA}/matrix`, { token: viewer });
    expect(matrix.body.cells).toEqual([expect.objectContaining({ captureId, outcome: 'error', reason: 'The stored capture cannot be read: test outage' })]);
  });

  it('answers 410 in words for the download and for analysing again once retention removed the audio', async () => {
    const em = api.orm.em.fork();
    const row = await em.findOneOrFail(Capture, { id: captureId });
    row.purgedAt = new Date('2026-11-30T12:00:00Z');
    await em.flush();
    const engineer = await api.login('engineer@example.test');
    const sentence = 'The audio of this capture was removed by the retention policy on 2026-11-30; its verdict is kept.';
    for (const [method, path] of [['GET', '/download'], ['POST', '/reanalyse']] as const) {
      const res = await api.request(method, `${base()}${path}`, { token: engineer });
      expect(res.status, path).toBe(410);
      expect(res.contentType).toMatch(/problem\+json/);
      expect(res.body.detail).toBe(sentence);
    }
  });
});
