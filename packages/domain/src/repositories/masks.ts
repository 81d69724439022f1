import type { EntityManager } from '@mikro-orm/postgresql';
import { MaskRevision, type Project, type Target, type TestCase } from '@earmark/db';

/** The approved revision for this test case on this target; a target-specific one wins over "all targets". */
export async function maskInForce(em: EntityManager, testCase: TestCase, target: Target): Promise<MaskRevision | null> {
  const approved = await em.find(MaskRevision, { testCase, state: 'approved', $or: [{ target }, { target: null }] });
  return approved.find((m) => m.target?.id === target.id) ?? approved.find((m) => m.target === null) ?? null;
}

export interface RecentBuildRow {
  id: string;
  sha: string;
  branch: string | null;
  label: string | null;
  created_at: Date;
}

/**
 * The project's builds that hold captures of the test case, newest first: the `limit` newest
 * overall (`last-n`), or the newest of each branch (`open-builds`, a build without a branch counting as one branch).
 */
export function recentBuilds(em: EntityManager, project: Project, testCase: TestCase, scope: 'last-n' | 'open-builds', limit: number): Promise<RecentBuildRow[]> {
  const holdsCase = 'exists (select 1 from capture c where c.build_id = b.id and c.test_case_id = ?)';
  return em.getConnection().execute<RecentBuildRow[]>(
    scope === 'last-n'
      ? `select b.id, b.sha, b.branch, b.label, b.created_at from build b where b.project_id = ? and ${holdsCase}
          order by b.created_at desc limit ?`
      : `select * from (select distinct on (coalesce(b.branch, '')) b.id, b.sha, b.branch, b.label, b.created_at from build b
                         where b.project_id = ? and ${holdsCase}
                         order by coalesce(b.branch, ''), b.created_at desc) newest_per_branch
          order by created_at desc limit ?`,
    [project.id, testCase.id, limit],
  );
}

/**
 * Captures a revision governs in the given builds: the newest judged capture of each build and
 * target of the test case (earlier ones were re-runs), on the revision's target, or — for an
 * all-targets revision — on every target without an approved revision of its own. Impact runs
 * and re-evaluation both select their cells here.
 */
export async function capturesGovernedBy(em: EntityManager, revision: MaskRevision, buildIds: readonly string[]): Promise<{ id: string; build_id: string; purged: boolean }[]> {
  if (buildIds.length === 0) return [];
  const target = revision.target?.id ?? null;
  return em.getConnection().execute(
    `select distinct on (c.build_id, c.target_id) c.id, c.build_id, c.purged_at is not null as purged from capture c
      where c.test_case_id = ? and c.build_id = any(?::uuid[]) and c.status in ('done', 'error')
        and (?::uuid is not null and c.target_id = ?::uuid
             or ?::uuid is null and not exists (select 1 from mask_revision m where m.test_case_id = c.test_case_id
                                                  and m.target_id = c.target_id and m.state = 'approved'))
      order by c.build_id, c.target_id, c.created_at desc`,
    [revision.testCase.id, `{${buildIds.join(',')}}`, target, target, target],
  );
}
