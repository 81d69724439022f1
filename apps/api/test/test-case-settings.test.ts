import { ApiToken, AuditEvent, Capture, Target, TestCase } from '@earmark/db';
import { createLinks, judgeCapture, maskInForce, recordVerdict } from '@earmark/domain';
import { generateTokenSecret } from '@earmark/platform';
import { encodeWav } from '@earmark/dsp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

/**
 * Stimulus, analysis settings and channel map change verdicts: once a test case has captures
 * they change only through a reviewed mask revision, and every verdict records the settings it used.
 */
let api: TestApi;
let ci: string;
let engineer: string;
let qa: string;
let captureId: string;
const project = '/api/projects/alpha-dsp';
const stimulus = { kind: 'sine', sampleRate: 48000, seconds: 0.25, frequency: 997, levelDbfs: -12 };

/** Channel 0 at −12 dBFS (the stimulus), channel 1 at −30 dBFS. */
function stereoCapture(): Buffer {
  const frames = 12000;
  const sine = (dbfs: number) => Float64Array.from({ length: frames }, (_, i) => 10 ** (dbfs / 20) * Math.sin((2 * Math.PI * 997 * i) / 48000));
  return Buffer.from(encodeWav([sine(-12), sine(-30)], 48000));
}

async function upload(testCase: string, sha: string): Promise<string> {
  const res = await fetch(`${api.baseUrl}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=${testCase}&target=board`, {
    method: 'POST',
    headers: { authorization: `Bearer ${ci}`, 'content-type': 'audio/wav' },
    body: stereoCapture(),
  });
  expect(res.status, await res.clone().text()).toBe(202);
  return ((await res.json()) as { id: string }).id;
}

beforeAll(async () => {
  api = await startTestApi();
  const em = api.orm.em.fork();
  const { project: alpha, users } = api.fixture;
  em.create(TestCase, { project: alpha.id, key: 'tone', name: 'Tone', stimulus, channelMap: [0] });
  em.create(TestCase, { project: alpha.id, key: 'fresh', name: 'Fresh', stimulus, channelMap: [0] });
  em.create(Target, { project: alpha.id, key: 'board', name: 'Board', sampleRate: 48000 });
  const secret = generateTokenSecret();
  em.create(ApiToken, { project: alpha.id, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: users.admin.id });
  await em.flush();
  ci = secret.token;
  engineer = await api.login('engineer@example.test');
  qa = await api.login('qa_manager@example.test');
  captureId = await upload('tone', 'a1b2c3d4');
});
afterAll(() => api.close());

describe('changing a test case that has captures', () => {
  it('refuses a new channel map with 409 and keeps the settings the captures were judged with', async () => {
    const res = await api.request('PATCH', `${project}/test-cases/tone`, { token: engineer, body: { channelMap: [1] } });
    expect(res.status, res.text).toBe(409);
    expect(res.contentType).toContain('application/problem+json');
    expect(res.body.code).toBe('settings-under-review');
    expect(res.body.detail).toBe(
      'The channel map of test case tone is under review once captures exist: draft a mask revision with the new settings.',
    );
    const stored = await api.orm.em.fork().findOneOrFail(TestCase, { key: 'tone' });
    expect(stored.channelMap).toEqual([0]);
  });

  it('refuses new analysis settings or a new stimulus, naming each field that would change', async () => {
    const res = await api.request('PATCH', `${project}/test-cases/tone`, {
      token: engineer,
      body: { name: 'Tone (renamed too)', analysis: { transferMethod: 'deconvolution' }, stimulus: { ...stimulus, frequency: 1000 } },
    });
    expect(res.status, res.text).toBe(409);
    expect(res.body.detail).toBe(
      'The stimulus and analysis settings of test case tone are under review once captures exist: draft a mask revision with the new settings.',
    );
    // Nothing half-written: the name in the same request did not change either.
    expect((await api.orm.em.fork().findOneOrFail(TestCase, { key: 'tone' })).name).toBe('Tone');
  });

  it('accepts the unchanged settings sent back with a new name and description, and audits before and after', async () => {
    const current = await api.request('GET', `${project}/test-cases/tone`, { token: engineer });
    const res = await api.request('PATCH', `${project}/test-cases/tone`, {
      token: engineer,
      body: { name: 'Tone, 997 Hz', description: 'Left channel at −12 dBFS', stimulus: current.body.stimulus, analysis: current.body.analysis, channelMap: [0] },
    });
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ name: 'Tone, 997 Hz', description: 'Left channel at −12 dBFS', channelMap: [0], hasCaptures: true });
    const list = await api.request('GET', `${project}/test-cases`, { token: engineer });
    expect(list.body.items.map((t: { key: string; hasCaptures: boolean }) => [t.key, t.hasCaptures])).toEqual([['fresh', false], ['tone', true]]);
    const audit = await api.orm.em.fork().find(AuditEvent, { action: 'test-case.update', subject: 'test-case:tone' });
    expect(audit.map((e) => e.details)).toEqual([
      { changed: ['name', 'description'], before: { name: 'Tone', description: '' }, after: { name: 'Tone, 997 Hz', description: 'Left channel at −12 dBFS' } },
    ]);
  });
});

describe('setting up a test case before any capture', () => {
  it('allows direct edits of the channel map and analysis settings, audited with before and after', async () => {
    const res = await api.request('PATCH', `${project}/test-cases/fresh`, { token: engineer, body: { channelMap: [1], analysis: { transferMethod: 'h1' } } });
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ channelMap: [1], analysis: { transferMethod: 'h1' } });
    const audit = await api.orm.em.fork().find(AuditEvent, { action: 'test-case.update', subject: 'test-case:fresh' });
    expect(audit.map((e) => e.details)).toEqual([
      { changed: ['analysis', 'channelMap'], before: { analysis: {}, channelMap: [0] }, after: { analysis: { transferMethod: 'h1' }, channelMap: [1] } },
    ]);
    expect(await api.orm.em.fork().count(Capture, { testCase: { key: 'fresh' } })).toBe(0);
  });
});

/** What the worker does for one capture: judge it under the revision in force and record the verdict. */
async function judgeNow(): Promise<void> {
  const em = api.orm.em.fork();
  const capture = await em.findOneOrFail(Capture, { id: captureId }, { populate: ['project', 'build', 'testCase', 'target'] });
  const mask = await maskInForce(em, capture.testCase, capture.target);
  const bytes = await api.objectStore.get(capture.objectKey);
  const result = await recordVerdict(em, captureId, mask, judgeCapture(new Uint8Array(bytes), capture, mask), createLinks('http://earmark.test'));
  expect(result.written).toBe(true);
}

const verdictOnCapturePage = async () => {
  const page = await api.request('GET', `${project}/captures/${captureId}`, { token: engineer });
  expect(page.status, page.text).toBe(200);
  return page.body.capture.verdict;
};

describe('settings reviewed with the mask', () => {
  const masks = `${project}/test-cases/tone/masks`;
  const level = { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20, max: -6 };

  it('judges with the approved revision’s settings, then with a draft’s new channel map once it is reviewed and approved', async () => {
    // Revision 1 snapshots the test case's settings.
    const first = await api.request('POST', masks, { token: engineer, body: { checks: [level] } });
    expect(first.status, first.text).toBe(201);
    expect(first.body.settings).toEqual({ stimulus: { ...stimulus, channels: 1, fadeInSeconds: 0, fadeOutSeconds: 0 }, analysis: {}, channelMap: [0] });
    expect((await api.request('POST', `${masks}/1/submit`, { token: engineer })).status).toBe(200);
    expect((await api.request('POST', `${masks}/1/approve`, { token: qa })).status).toBe(200);
    await judgeNow();
    const before = await verdictOnCapturePage();
    expect(before).toMatchObject({ outcome: 'pass', maskRevision: 1, settings: { channelMap: [0], stimulus: { frequency: 997 } } });

    // Revision 2 moves the channel map to the quieter channel; the draft says so, nothing judges with it yet.
    const copy = await api.request('POST', `${masks}/1/copy`, { token: engineer, body: {} });
    expect(copy.status, copy.text).toBe(201);
    expect(copy.body.settings.channelMap).toEqual([0]);
    const bad = await api.request('PATCH', `${masks}/2`, { token: engineer, body: { settings: { channelMap: [9] } } });
    expect(bad.status).toBe(422);
    expect(bad.body.errors.map((e: { path: string }) => e.path)).toEqual(['body.settings.channelMap.0']);
    const edited = await api.request('PATCH', `${masks}/2`, { token: engineer, body: { settings: { channelMap: [1] } } });
    expect(edited.status, edited.text).toBe(200);
    expect(edited.body.settings).toEqual({ ...first.body.settings, channelMap: [1] });

    const diff = await api.request('GET', `${masks}/2/diff`, { token: qa });
    expect(diff.status, diff.text).toBe(200);
    expect(diff.body.settingsChanges).toEqual([{ path: 'channelMap', before: [0], after: [1] }]);
    expect(diff.body.summary).toEqual({ added: 0, removed: 0, changed: 0, unchanged: 1 });

    expect((await api.request('POST', `${masks}/2/submit`, { token: engineer })).status).toBe(200);
    const frozen = await api.request('PATCH', `${masks}/2`, { token: engineer, body: { settings: { channelMap: [0] } } });
    expect(frozen.status).toBe(409);
    const approved = await api.request('POST', `${masks}/2/approve`, { token: qa, body: { comment: 'Right channel is the one under test.' } });
    expect(approved.status, approved.text).toBe(200);

    // The next verdict judges the same capture with the approved settings and records them.
    await judgeNow();
    const after = await verdictOnCapturePage();
    expect(after).toMatchObject({ outcome: 'fail', maskRevision: 2, previousMaskRevision: 1, settings: { channelMap: [1], stimulus: { frequency: 997 } } });
    expect(after.checks[0].measured).toBeLessThan(-25);
    expect(before.checks[0].measured).toBeGreaterThan(-16);

    // Revision 1 keeps what was reviewed; the test case now shows the settings in force, audited as coming from revision 2.
    expect((await api.request('GET', `${masks}/1`, { token: engineer })).body.settings.channelMap).toEqual([0]);
    expect((await api.request('GET', `${project}/test-cases/tone`, { token: engineer })).body.channelMap).toEqual([1]);
    const adopted = await api.orm.em.fork().findOneOrFail(AuditEvent, { action: 'test-case.update', subject: 'test-case:tone', details: { via: 'mask:tone#2' } });
    expect(adopted.actor).toBe('user:qa_manager@example.test');
    expect(adopted.details).toMatchObject({ changed: ['channelMap'], before: { channelMap: [0] }, after: { channelMap: [1] } });
  });

  it('lets set-up edits reach drafts that still carry the test case settings, not drafts with settings of their own', async () => {
    const fresh = `${project}/test-cases/fresh/masks`;
    const plain = await api.request('POST', fresh, { token: engineer, body: { checks: [level] } });
    const own = await api.request('POST', fresh, { token: engineer, body: { checks: [level] } });
    expect((await api.request('PATCH', `${fresh}/${own.body.revision}`, { token: engineer, body: { settings: { analysis: { transferMethod: 'deconvolution' } } } })).status).toBe(200);

    const res = await api.request('PATCH', `${project}/test-cases/fresh`, { token: engineer, body: { channelMap: [0, 1] } });
    expect(res.status, res.text).toBe(200);
    expect((await api.request('GET', `${fresh}/${plain.body.revision}`, { token: engineer })).body.settings).toMatchObject({ channelMap: [0, 1], analysis: { transferMethod: 'h1' } });
    expect((await api.request('GET', `${fresh}/${own.body.revision}`, { token: engineer })).body.settings).toMatchObject({ channelMap: [1], analysis: { transferMethod: 'deconvolution' } });
    const audit = await api.orm.em.fork().find(AuditEvent, { action: 'test-case.update', subject: 'test-case:fresh' }, { orderBy: { createdAt: 'desc' } });
    expect(audit[0]!.details).toEqual({ draftsUpdated: [plain.body.revision], changed: ['channelMap'], before: { channelMap: [1] }, after: { channelMap: [0, 1] } });
  });
});
