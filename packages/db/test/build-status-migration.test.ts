import { describe, expect, it } from 'vitest';
import { Build, Capture, Project, Target, TestCase, Verdict } from '../src/index.js';
import { Migration20261202180100 } from '../src/migrations/migration-20261202180100.js';
import { useSeededDatabase } from '../src/testing/index.js';

/**
 * Migration 20261202180100: every stored build status is computed again by today's rule
 * (an error outranks a failure) from each capture's status and newest verdict. Its SQL runs
 * on rows written as the old rule left them; down() restores the old ranking.
 */
const seeded = useSeededDatabase();

async function run(direction: 'up' | 'down'): Promise<void> {
  const migration = new Migration20261202180100(seeded.orm.em.getDriver(), seeded.orm.config);
  await migration[direction]();
  for (const sql of migration.getQueries()) await seeded.orm.em.getConnection().execute(sql as string);
}

type Verdicts = ('pass' | 'fail' | 'error')[];
type CaptureRow = { status: Capture['status']; verdicts: Verdicts };

describe('build status migration', () => {
  it('recomputes every stored status with an error outranking a failure, by the newest verdict of each capture', async () => {
    const em = seeded.orm.em.fork();
    const project = await em.findOneOrFail(Project, { key: seeded.fixture.project.key });
    const testCase = em.create(TestCase, { project, key: 'migr.case', name: 'case', stimulus: { kind: 'silence' } });
    const target = em.create(Target, { project, key: 'migr-board', name: 'board' });
    await em.flush();
    const t0 = Date.now() - 3_600_000;
    let seq = 0;
    // Each build: the status the old rule stored, its captures (verdicts oldest first), the status expected after.
    const cases: { sha: string; stored: Build['status']; captures: CaptureRow[]; expected: Build['status'] }[] = [
      { sha: 'f00e001', stored: 'fail', captures: [{ status: 'done', verdicts: ['fail'] }, { status: 'error', verdicts: ['error'] }], expected: 'error' },
      { sha: 'f00e002', stored: 'fail', captures: [{ status: 'done', verdicts: ['fail'] }, { status: 'error', verdicts: [] }], expected: 'error' },
      { sha: 'f00e003', stored: 'fail', captures: [{ status: 'done', verdicts: ['fail'] }, { status: 'done', verdicts: ['pass'] }], expected: 'fail' },
      // Re-judged: the newest verdict counts (fail then pass: the build passes now).
      { sha: 'f00e004', stored: 'fail', captures: [{ status: 'done', verdicts: ['fail', 'pass'] }], expected: 'pass' },
      { sha: 'f00e005', stored: 'pass', captures: [{ status: 'done', verdicts: ['pass', 'fail'] }, { status: 'error', verdicts: ['pass', 'error'] }], expected: 'error' },
      { sha: 'f00e006', stored: 'fail', captures: [{ status: 'done', verdicts: ['fail'] }, { status: 'queued', verdicts: [] }], expected: 'pending' },
      { sha: 'f00e007', stored: 'error', captures: [{ status: 'error', verdicts: ['error'] }, { status: 'analysing', verdicts: [] }], expected: 'running' },
      { sha: 'f00e008', stored: 'pass', captures: [], expected: 'pending' },
    ];
    for (const c of cases) {
      const build = em.create(Build, { project, sha: c.sha, status: c.stored });
      for (const row of c.captures) {
        const capture = em.create(Capture, {
          project, build, testCase, target, status: row.status, objectKey: `k-${c.sha}`, sha256: 'a'.repeat(64), sizeBytes: 1, sampleRate: 48000, channelCount: 1, frames: 1,
        });
        row.verdicts.forEach((outcome, i) =>
          em.create(Verdict, { capture, outcome, engineVersion: `1.0.${i}`, createdAt: new Date(t0 + ++seq * 1000) }),
        );
      }
    }
    await em.flush();
    const statuses = async () =>
      Object.fromEntries((await seeded.orm.em.fork().find(Build, { sha: { $in: cases.map((c) => c.sha) } })).map((b) => [b.sha, b.status]));

    await run('up');
    expect(await statuses()).toEqual(Object.fromEntries(cases.map((c) => [c.sha, c.expected])));

    // down() ranks as the old rule did: a failure above an error.
    await run('down');
    const old = await statuses();
    expect([old.f00e001, old.f00e002, old.f00e005, old.f00e004, old.f00e007]).toEqual(['fail', 'fail', 'fail', 'pass', 'running']);
  });
});
