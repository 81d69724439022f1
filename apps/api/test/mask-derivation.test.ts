import { DeriveMaskResponse, MaskCheck, StimulusSpec } from '@earmark/contracts';
import { Build, Capture, MaskRevision, Target, TestCase, testCaseSettings } from '@earmark/db';
import { encodeWav, sampleLimit, stimulusAsPlayed, studentTUpperTail } from '@earmark/dsp';
import { applyBiquad, mapChannels, peakingEqCoefficients, scaleDb } from '@earmark/dsp/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

// Golden captures: the test case's sweep scaled by gains ±a (four each), so the mean is 0 dB and
// the sample standard deviation is exactly σ = a·√(8/7) at every frequency (scaling shifts |H| in
// dB uniformly; 1/6-octave smoothing of a uniformly scaled |H|² keeps the shift).
const SIGMA = 0.4;
const a = SIGMA * Math.sqrt(7 / 8);
const GAINS = [a, -a, a, -a, a, -a, a, -a];
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: 48000, from: 20, to: 20000, seconds: 1, levelDbfs: -6 });

let api: TestApi;
const golden: string[] = [];
let foreignCapture = '';
let resonant = '';
let onBench = '';
const base = '/api/projects/alpha-dsp/test-cases/eq.sweep/masks';

beforeAll(async () => {
  api = await startTestApi();
  const em = api.orm.em.fork();
  const project = api.fixture.project.id;
  const testCase = em.create(TestCase, { project, key: 'eq.sweep', name: 'EQ sweep', stimulus: spec as unknown as Record<string, unknown> });
  const other = em.create(TestCase, { project, key: 'other', name: 'Other', stimulus: spec as unknown as Record<string, unknown> });
  const target = em.create(Target, { project, key: 'board', name: 'Board' });
  const build = em.create(Build, { project, sha: 'a1b2c3d4' });
  const played = stimulusAsPlayed(spec);
  const bench = em.create(Target, { project, key: 'bench', name: 'Bench' });
  const put = async (tc: TestCase, gain: number, i: number, shape: (x: Float64Array) => Float64Array = (x) => x, on: Target = target) => {
    const wav = encodeWav(mapChannels(played, (x) => shape(scaleDb(x, gain))).channels, 48000, { encoding: 'float', bitsPerSample: 32 });
    const key = `test/${tc.key}-${i}.wav`;
    await api.objectStore.put(key, wav, 'audio/wav');
    return em.create(Capture, { project, build, testCase: tc, target: on, objectKey: key, sha256: '0'.repeat(64), sizeBytes: wav.length, format: { container: 'wav' }, sampleRate: 48000, channelCount: 1, frames: played.channels[0]!.length, status: 'done' });
  };
  for (const [i, g] of GAINS.entries()) golden.push((await put(testCase, g, i)).id);
  foreignCapture = (await put(other, 0, 99)).id;
  // A unit with a +4 dB resonance at 5 kHz (peaking EQ, Q 2), and an ordinary one on another target.
  resonant = (await put(testCase, 0, 50, (x) => applyBiquad(x, peakingEqCoefficients(48000, 5000, 4, 2)))).id;
  onBench = (await put(testCase, 0, 51, (x) => x, bench)).id;
  await em.flush();
});
afterAll(() => api.close());

describe('POST …/masks/derive', () => {
  it('proposes mean ± (kσ + guard) from golden captures, within the segment budget', async () => {
    const engineer = await api.login('engineer@example.test');
    const res = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds: golden, k: 2, guardDb: 0.5, maxSegments: 6, bandHz: [50, 16000], referenceHz: null } });
    expect(res.status, res.text).toBe(200);
    const body = DeriveMaskResponse.parse(res.body);
    const check = MaskCheck.parse(body.check);
    expect(check).toMatchObject({ kind: 'magnitude-envelope', id: 'derived-envelope', measure: 'transfer', referenceHz: null, smoothing: 6 });
    if (check.kind !== 'magnitude-envelope') throw new Error('not an envelope');
    expect(check.upper!.length).toBeLessThanOrEqual(7);
    expect(check.lower!.length).toBeLessThanOrEqual(7);
    expect(body.stats.captures).toBe(8);
    // σ is the gains' σ at every frequency (construction above; absolute gain, no normalisation, which
    // would divide the gains out); float32 storage rounds to ~1e-7. The mean is 0 dB ± sweep ripple.
    for (const s of body.stats.std) expect(Math.abs(s - SIGMA)).toBeLessThan(1e-4);
    for (const m of body.stats.mean) expect(Math.abs(m)).toBeLessThan(0.1);
    body.stats.upperRaw.forEach((u, i) => expect(Math.abs(u - (body.stats.mean[i]! + 2 * SIGMA + 0.5))).toBeLessThan(1e-3));
    // The simplified limits never lie inside the raw ones (checked at the plotted columns too).
    const up = sampleLimit(check.upper!, Float64Array.from(body.stats.hz));
    body.stats.upperRaw.forEach((u, i) => expect(up[i]!).toBeGreaterThanOrEqual(u - 0.05));
    expect(body.stats.maxStrayDb).toBe(0);
    expect(body.stats.maxDeviationDb.overall).toBeGreaterThanOrEqual(0);
    expect(body.stats.worstGoldenMarginDb).toBeGreaterThan(0);
    expect(body.derivation).toMatchObject({ captureIds: golden, k: 2, guardDb: 0.5, maxSegments: 6, smoothing: 6, measure: 'transfer', channel: 0, bandHz: [50, 16000] });
  });

  it('estimates the false-reject rate by leave-one-out and from the per-frequency statistics, over guard bands', async () => {
    const engineer = await api.login('engineer@example.test');
    // k = 0: limits at mean ± guard. Leaving out a capture at +a (a = 0.374 dB), the other seven
    // average −a/7 = −0.053 dB, so it sits 8a/7 = 0.428 dB from their mean (the same for every capture
    // by symmetry). The derived breakpoints are rounded outward to 0.1 dB in absolute level, so the
    // upper limit at guard g is −0.053 + g rounded up: 0.3 dB at g = 0.3 (below +a: every capture
    // fails) and 0.4 dB at g = 0.4 (above +a: every capture passes), up to the sweep's ripple.
    const res = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds: golden, k: 0, guardDb: 0.5, maxSegments: 12, bandHz: [50, 16000], referenceHz: null } });
    expect(res.status, res.text).toBe(200);
    const { yieldEstimate } = DeriveMaskResponse.parse(res.body);
    expect(yieldEstimate!.leaveOneOut).toEqual({ rate: 0, low: 0, high: expect.closeTo(3.8415 / 11.8415, 4), n: 8, failures: 0 });
    const at = (g: number) => yieldEstimate!.byGuardBandDb.find((row) => Math.abs(row.guardDb - g) < 1e-9)!;
    expect(yieldEstimate!.byGuardBandDb).toHaveLength(31);
    expect(at(0.3).leaveOneOut).toMatchObject({ rate: 1, failures: 8 });
    expect(at(0.4).leaveOneOut).toMatchObject({ rate: 0, failures: 0 });
    // Gaussian model with σ = 0.4 dB from N = 8: at guard 0 the limits are the mean itself, so every
    // unit fails; at 1.2 dB one frequency fails with 2·T₇(1.2 / (0.4·√(9/8))) (Student's t, 7 degrees
    // of freedom) at most, as simplification and 0.1 dB outward rounding only widen, and with at
    // least 2·T₇(1.3 / (0.4·√(9/8))) where the rounded limits come within 0.1 dB of the raw ones;
    // the bounds bracket the shown rate.
    expect(at(0).parametric.rate).toBeCloseTo(1, 6);
    const wide = at(1.2).parametric;
    const oneFrequency = 2 * studentTUpperTail(1.2 / (0.4 * Math.sqrt(9 / 8)), 7);
    expect(wide.correlatedBound).toBeLessThanOrEqual(oneFrequency + 1e-12);
    expect(wide.correlatedBound).toBeGreaterThan(2 * studentTUpperTail(1.3 / (0.4 * Math.sqrt(9 / 8)), 7));
    expect(wide.rate).toBeGreaterThanOrEqual(wide.correlatedBound);
    expect(wide.rate).toBeLessThanOrEqual(wide.independentBound);
    // 1/6-octave bands over 50 Hz … 16 kHz (8.3 octaves) hold 50 bands, fewer where the lowest bands
    // are narrower than the analysis' frequency spacing and hold no frequency (45 here).
    expect(wide.effectiveBands).toBeGreaterThan(40);
    expect(wide.effectiveBands).toBeLessThanOrEqual(50);
  });

  it('validates the request and names the failing field', async () => {
    const engineer = await api.login('engineer@example.test');
    const one = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds: [golden[0]] } });
    expect(one.status).toBe(422);
    expect(one.body.errors.map((e: { path: string }) => e.path)).toContain('body.captureIds');
    const repeated = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds: [golden[0], golden[0]] } });
    expect(repeated.status).toBe(422);
    const badK = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds: golden, k: -1, maxSegments: 0 } });
    expect(badK.status).toBe(422);
    expect(badK.body.errors.map((e: { path: string }) => e.path)).toEqual(expect.arrayContaining(['body.k', 'body.maxSegments']));
    const foreign = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds: [golden[0], foreignCapture] } });
    expect(foreign.status).toBe(422);
    expect(foreign.body.errors).toEqual([{ path: 'body.captureIds.1', message: 'not a capture of test case eq.sweep' }]);
    const levelRef = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds: golden, measure: 'level', referenceHz: 1000 } });
    expect(levelRef.status).toBe(422);
    const noChannel = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds: golden, channel: 3 } });
    expect(noChannel.status).toBe(422);
    expect(noChannel.body.detail).toMatch(/channel 3/);
    const viewer = await api.login('viewer@example.test');
    expect((await api.request('POST', `${base}/derive`, { token: viewer, body: { captureIds: golden } })).status).toBe(403);
    expect((await api.request('POST', '/api/projects/alpha-dsp/test-cases/nope/masks/derive', { token: engineer, body: { captureIds: golden } })).status).toBe(404);
  });
});

describe('POST …/masks/derive: outliers and targets', () => {
  it('names a golden capture beyond 3σ of the others, with where it deviates, and draws every capture', async () => {
    const engineer = await api.login('engineer@example.test');
    const captureIds = [...golden, resonant];
    const res = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds, bandHz: [50, 16000], referenceHz: null } });
    expect(res.status, res.text).toBe(200);
    const body = DeriveMaskResponse.parse(res.body);
    // Only the resonant unit: 4 dB at 5 kHz against the others' σ of 0.4 dB is 10σ (the ±0.37 dB gains stay well inside).
    expect(body.outliers.map((o) => [o.captureId, o.target])).toEqual([[resonant, 'board']]);
    const { worst, regions } = body.outliers[0]!;
    expect(regions).toHaveLength(1);
    expect(worst.atHz).toBeGreaterThan(4000);
    expect(worst.atHz).toBeLessThan(6300);
    expect(worst.fromHz).toBeLessThan(5000);
    expect(worst.toHz).toBeGreaterThan(5000);
    // 1/6-octave smoothing and band averaging spread the 4 dB peak a little.
    expect(worst.deviationDb).toBeGreaterThan(2.5);
    expect(worst.deviationDb).toBeLessThan(4.1);
    expect(worst.sigmas).toBeGreaterThan(6);
    // One plotted curve per golden capture, on the statistics' columns; the resonant one peaks near 5 kHz.
    expect(body.stats.curves).toHaveLength(captureIds.length);
    for (const c of body.stats.curves!) expect(c).toHaveLength(body.stats.hz.length);
    const at5k = body.stats.hz.findIndex((f) => f >= 5000);
    expect(body.stats.curves![8]![at5k]! - body.stats.mean[at5k]!).toBeGreaterThan(2);
    expect(body.warnings).toEqual([]);
  });

  it('derives across targets but warns, naming them', async () => {
    const engineer = await api.login('engineer@example.test');
    const res = await api.request('POST', `${base}/derive`, { token: engineer, body: { captureIds: [...golden.slice(0, 3), onBench] } });
    expect(res.status, res.text).toBe(200);
    const body = DeriveMaskResponse.parse(res.body);
    expect(body.warnings).toEqual([
      {
        code: 'mixed-targets',
        targets: ['bench', 'board'],
        message: 'The golden captures come from 2 targets: bench (1), board (3). Their differences count as unit-to-unit spread and widen the limits; derive from one target unless one mask should cover them all.',
      },
    ]);
  });
});

describe('impact and re-evaluation requests', () => {
  it('answers 404 for an unknown revision and 409 when re-evaluating a draft', async () => {
    const engineer = await api.login('engineer@example.test');
    const qa = await api.login('qa_manager@example.test');
    expect((await api.request('POST', `${base}/9/impact`, { token: engineer, body: {} })).status).toBe(404);
    const em = api.orm.em.fork();
    const testCase = await em.findOneOrFail(TestCase, { key: 'eq.sweep' });
    em.create(MaskRevision, { testCase, revision: 1, checks: [{ id: 'l', kind: 'level', metric: 'rms-dbfs', max: 0 }], settings: testCaseSettings(testCase), author: api.fixture.users.engineer.id });
    await em.flush();
    const started = await api.request('POST', `${base}/1/impact`, { token: engineer, body: { builds: 5 } });
    expect(started.status, started.text).toBe(202);
    expect(started.body).toMatchObject({ revision: 1, builds: 5, state: 'queued', progress: 0, result: null, requestedBy: 'engineer@example.test' });
    const got = await api.request('GET', `${base}/1/impact/${started.body.id}`, { token: engineer });
    expect(got.body.id).toBe(started.body.id);
    expect((await api.request('POST', `${base}/1/impact`, { token: engineer, body: { builds: 101 } })).status).toBe(422);
    const draft = await api.request('POST', `${base}/1/reevaluate`, { token: qa, body: { scope: 'open-builds' } });
    expect(draft.status).toBe(409);
    expect((await api.request('POST', `${base}/1/reevaluate`, { token: qa, body: { scope: 'sometimes' } })).status).toBe(422);
  });

  it('drift needs a branch and answers an empty series for one without builds', async () => {
    const viewer = await api.login('viewer@example.test');
    expect((await api.request('GET', '/api/projects/alpha-dsp/drift', { token: viewer })).status).toBe(422);
    const res = await api.request('GET', '/api/projects/alpha-dsp/drift?branch=main', { token: viewer });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ branch: 'main', window: 10, thresholdDb: 1, series: [] });
  });
});
