import { Build, Capture, Target, TestCase } from '@earmark/db';
import { createLinks, recordVerdict, type Judgement } from '@earmark/domain';
import { FindingsPage, ProjectOverview, type FindingRow } from '@earmark/contracts';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

let api: TestApi;
const base = '/api/projects/alpha-dsp';

/** A judgement with two checks: `response` fails by `margin` when `fails`, `peak` always passes. */
function judgement(fails: boolean, margin = -0.8319): Judgement {
  return {
    outcome: fails ? 'fail' : 'pass',
    reason: fails ? '1 of 2 checks failed' : null,
    engineVersion: 'test-1',
    checks: [
      { id: 'response', kind: 'magnitude-envelope', label: 'Passband', pass: !fails, measured: null, limit: null, margin: fails ? margin : 1.5, unit: 'dB', worstHz: 7986.3, details: {} },
      { id: 'peak', kind: 'level', label: null, pass: true, measured: -6, limit: 0, margin: 6, unit: 'dBFS', worstHz: null, details: {} },
    ],
  };
}

/** A build of `branch` created on day `day` of November 2026, with one capture judged as `fails` says. */
async function judgedBuild(sha: string, branch: string, day: number, fails: boolean): Promise<void> {
  const em = api.orm.em.fork();
  const project = api.fixture.project;
  const testCase = await em.findOneOrFail(TestCase, { project, key: 'sweep' });
  const target = await em.findOneOrFail(Target, { project, key: 'board' });
  const build = em.create(Build, { project, sha, branch, status: 'running' });
  const capture = em.create(Capture, {
    project, build, testCase, target, objectKey: `captures/alpha-dsp/${sha}/sweep.wav`, sha256: '0'.repeat(64), sizeBytes: 100,
    format: { container: 'wav' }, sampleRate: 48000, channelCount: 1, frames: 4800, status: 'analysing',
  });
  await em.flush();
  const at = new Date(Date.UTC(2026, 10, day, 9));
  await em.getConnection().execute('update build set created_at = ? where id = ?', [at, build.id]);
  await em.getConnection().execute('update capture set created_at = ? where id = ?', [at, capture.id]);
  expect((await recordVerdict(api.orm.em.fork(), capture.id, null, judgement(fails), createLinks('http://earmark.test'))).written).toBe(true);
}

async function get<T>(path: string, who: string): Promise<T> {
  const res = await api.request('GET', path, { token: await api.login(who) });
  expect(res.status, res.text).toBe(200);
  return res.body as T;
}

beforeAll(async () => {
  api = await startTestApi();
  const em = api.orm.em.fork();
  const project = api.fixture.project;
  em.create(TestCase, { project, key: 'sweep', name: 'Sweep', stimulus: { kind: 'sine', sampleRate: 48000, seconds: 0.1, frequency: 997, levelDbfs: -12 } });
  em.create(Target, { project, key: 'board', name: 'Board', sampleRate: 48000 });
  await em.flush();
  // main: pass, pass, fail, fail; a feature branch fails once in between.
  await judgedBuild('a1a1a1a1', 'main', 1, false);
  await judgedBuild('b2b2b2b2', 'main', 2, false);
  await judgedBuild('c3c3c3c3', 'main', 3, true);
  await judgedBuild('f0f0f0f0', 'feature/eq', 4, true);
  await judgedBuild('d4d4d4d4', 'main', 5, true);
});
afterAll(() => api.close());

describe('GET /api/projects/:project/overview', () => {
  it("shows main's verdict, each branch's trend and what fails on main since which build", async () => {
    const overview = await get<ProjectOverview>(`${base}/overview`, 'viewer@example.test');
    // The answer is the contract's shape, the same schema the web app parses with.
    expect(ProjectOverview.safeParse(overview).success).toBe(true);
    expect(overview.mainBranch).toBe('main');
    expect(overview.main).toMatchObject({ sha: 'd4d4d4d4', status: 'fail', counts: { pass: 0, fail: 1, error: 0 } });
    expect(overview.branches.map((b) => [b.branch, b.marks.map((m) => `${m.sha.slice(0, 2)}:${m.status}`), b.builds])).toEqual([
      ['main', ['a1:pass', 'b2:pass', 'c3:fail', 'd4:fail'], 4],
      ['feature/eq', ['f0:fail'], 1],
    ]);
    expect(overview.failing).toHaveLength(1);
    expect(overview.failing[0]).toMatchObject({
      testCase: 'sweep', target: 'board', checkId: 'response', label: 'Passband', kind: 'magnitude-envelope',
      margin: -0.8319, unit: 'dB', worstHz: 7986.3, latest: { sha: 'd4d4d4d4' }, since: { sha: 'c3c3c3c3' }, streak: 2,
    });
    expect(overview.counts.openFindingsOnMain).toBe(1);
    // A viewer decides nothing.
    expect(overview.awaiting).toEqual([]);
    expect(overview.counts.awaitingYou).toBe(0);
  });

  it("lists a waiver request for a QA manager who may decide it, not for the engineer who asked", async () => {
    const [finding] = (await get<{ items: FindingRow[] }>(`${base}/findings?branch=main`, 'viewer@example.test')).items;
    const engineer = await api.login('engineer@example.test');
    const asked = await api.request('POST', `${base}/findings/${finding!.id}/waivers`, { token: engineer, body: { reason: 'known 8 kHz bump', until: '2099-01-01' } });
    expect(asked.status, asked.text).toBe(201);

    const forQa = await get<ProjectOverview>(`${base}/overview`, 'qa_manager@example.test');
    expect(forQa.awaiting).toEqual([expect.objectContaining({ kind: 'waiver', testCase: 'sweep', subject: 'response', requestedBy: 'engineer@example.test' })]);
    expect(forQa.counts.awaitingYou).toBe(1);
    const forEngineer = await get<ProjectOverview>(`${base}/overview`, 'engineer@example.test');
    expect(forEngineer.counts.awaitingYou).toBe(0);
  });
});

describe('GET /api/projects/:project/findings (triage)', () => {
  it('keeps branches apart and says since when, how often and where first seen', async () => {
    const main = await get<{ items: FindingRow[]; total: number }>(`${base}/findings?branch=main`, 'viewer@example.test');
    expect(FindingsPage.safeParse(main).success).toBe(true);
    expect(main.total).toBe(1);
    expect(main.items[0]).toMatchObject({
      branch: 'main', buildSha: 'd4d4d4d4', occurrences: 2, firstSeen: { sha: 'c3c3c3c3' }, failingSince: { sha: 'c3c3c3c3' },
      checkKind: 'magnitude-envelope', checkLabel: 'Passband',
      // Rendered from the fields by the one formatter, not the stored sentence.
      title: 'Passband (magnitude envelope): −0.83 dB at 7.99 kHz',
    });
    const feature = await get<{ items: FindingRow[] }>(`${base}/findings?branch=feature%2Feq`, 'viewer@example.test');
    expect(feature.items.map((f) => [f.branch, f.buildSha, f.occurrences, f.failingSince?.sha])).toEqual([['feature/eq', 'f0f0f0f0', 1, 'f0f0f0f0']]);
    const all = await get<{ total: number }>(`${base}/findings`, 'viewer@example.test');
    expect(all.total).toBe(2);
  });

  it('a finding whose check passes again keeps its count and loses its "since"', async () => {
    await judgedBuild('e5e5e5e5', 'main', 6, false);
    const [finding] = (await get<{ items: FindingRow[] }>(`${base}/findings?branch=main`, 'viewer@example.test')).items;
    expect(finding).toMatchObject({ occurrences: 2, firstSeen: { sha: 'c3c3c3c3' }, failingSince: null });
    const overview = await get<ProjectOverview>(`${base}/overview`, 'viewer@example.test');
    expect(overview.failing).toEqual([]);
    expect(overview.main?.status).toBe('pass');
  });

  it('refuses a branch filter that is empty, in words', async () => {
    const res = await api.request('GET', `${base}/findings?branch=`, { token: await api.login('viewer@example.test') });
    expect(res.status).toBe(422);
    expect(res.contentType).toContain('application/problem+json');
    expect(res.text).toContain('branch');
  });
});
