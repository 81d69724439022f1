import { UniqueConstraintViolationException } from '@mikro-orm/postgresql';
import { describe, expect, it } from 'vitest';
import { Build, Capture, MaskRevision, Project, Target, TestCase, Verdict, testCaseSettings } from '../src/index.js';
import { useSeededDatabase } from '../src/testing/index.js';

const seeded = useSeededDatabase(3);

async function caseAndTarget(em = seeded.orm.em.fork()) {
  const project = await em.findOneOrFail(Project, { key: seeded.fixture.project.key });
  const testCase = em.create(TestCase, { project, key: `tc.${Math.random()}`, name: 'case', stimulus: { kind: 'silence' } });
  const target = em.create(Target, { project, key: `t-${Math.random()}`, name: 'target' });
  await em.flush();
  return { em, project, testCase, target };
}

describe('schema', () => {
  it('matches the entities: a fresh migration:create would be empty', async () => {
    // The CI check that no entity change ships without its migration.
    expect(await seeded.orm.getMigrator().checkMigrationNeeded()).toBe(false);
  });

  it('allows one build per project and commit SHA', async () => {
    const em = seeded.orm.em.fork();
    const project = await em.findOneOrFail(Project, { key: seeded.fixture.project.key });
    em.create(Build, { project, sha: 'abc1234' });
    await em.flush();
    const em2 = seeded.orm.em.fork();
    em2.create(Build, { project: project.id, sha: 'abc1234' });
    await expect(em2.flush()).rejects.toBeInstanceOf(UniqueConstraintViolationException);
  });

  it('allows only one approved mask revision per test case and target (including "all targets")', async () => {
    const { em, testCase } = await caseAndTarget();
    const settings = testCaseSettings(testCase);
    em.create(MaskRevision, { testCase, revision: 1, state: 'approved', settings, author: seeded.fixture.users.qa_manager.id });
    await em.flush();
    const em2 = seeded.orm.em.fork();
    em2.create(MaskRevision, { testCase: testCase.id, revision: 2, state: 'draft', settings, author: seeded.fixture.users.engineer.id });
    await em2.flush(); // drafts may coexist with the approved one
    em2.create(MaskRevision, { testCase: testCase.id, revision: 3, state: 'approved', settings, author: seeded.fixture.users.qa_manager.id });
    await expect(em2.flush()).rejects.toBeInstanceOf(UniqueConstraintViolationException);
  });

  it('keeps one verdict per capture and mask revision, also when no mask was in force', async () => {
    const { em, project, testCase, target } = await caseAndTarget();
    const build = em.create(Build, { project, sha: 'fedcba9' });
    const capture = em.create(Capture, {
      project, build, testCase, target, objectKey: 'k', sha256: 'f'.repeat(64), sizeBytes: 10, sampleRate: 48000, channelCount: 1, frames: 1,
    });
    em.create(Verdict, { capture, outcome: 'error', reason: 'no mask', engineVersion: '0.1.0' });
    await em.flush();
    const em2 = seeded.orm.em.fork();
    em2.create(Verdict, { capture: capture.id, outcome: 'error', reason: 'again', engineVersion: '0.1.0' });
    await expect(em2.flush()).rejects.toBeInstanceOf(UniqueConstraintViolationException);
  });

  it('allows a capture another verdict under the same revision and engine only with another waiver basis', async () => {
    const { em, project, testCase, target } = await caseAndTarget();
    const build = em.create(Build, { project, sha: 'ba51501' });
    const capture = em.create(Capture, {
      project, build, testCase, target, objectKey: 'k', sha256: 'b'.repeat(64), sizeBytes: 10, sampleRate: 48000, channelCount: 1, frames: 1,
    });
    const judged = em.create(Verdict, { capture, outcome: 'fail', reason: 'loudness', engineVersion: '1.0.0' });
    await em.flush();
    expect(judged.waiverBasis).toBe('');
    em.create(Verdict, { capture, outcome: 'pass', reason: 'passed with waiver: loudness', engineVersion: '1.0.0', waiverBasis: 'w-1;approved=w-1', previous: judged });
    em.create(Verdict, { capture, outcome: 'fail', reason: 'loudness', engineVersion: '1.0.0', waiverBasis: ';revoked=w-1' });
    await em.flush(); // re-judged when the waiver came and when it went
    const em2 = seeded.orm.em.fork();
    em2.create(Verdict, { capture: capture.id, outcome: 'pass', reason: 'again', engineVersion: '1.0.0', waiverBasis: 'w-1;approved=w-1' });
    await expect(em2.flush()).rejects.toBeInstanceOf(UniqueConstraintViolationException);
  });

  it('makes an Idempotency-Key unique per project', async () => {
    const { em, project, testCase, target } = await caseAndTarget();
    const build = em.create(Build, { project, sha: '1234567' });
    const base = { project, build, testCase, target, objectKey: 'k', sha256: 'a'.repeat(64), sizeBytes: 1, sampleRate: 48000, channelCount: 1, frames: 1 };
    em.create(Capture, { ...base, idempotencyKey: 'ci-run-7' });
    em.create(Capture, { ...base, idempotencyKey: null });
    em.create(Capture, { ...base, idempotencyKey: null }); // captures without a key never collide
    await em.flush();
    const em2 = seeded.orm.em.fork();
    em2.create(Capture, { ...base, project: project.id, build: build.id, testCase: testCase.id, target: target.id, idempotencyKey: 'ci-run-7' });
    await expect(em2.flush()).rejects.toBeInstanceOf(UniqueConstraintViolationException);
  });

  it('has the dashboard indexes', async () => {
    const rows = await seeded.orm.em.getConnection().execute<{ indexname: string }[]>(`select indexname from pg_indexes where schemaname = 'public'`);
    const names = rows.map((r) => r.indexname);
    expect(names).toEqual(expect.arrayContaining(['build_project_created_at_idx', 'capture_build_id_index', 'finding_state_idx']));
  });
});
