import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { Build, type Project } from '@earmark/db';

/**
 * The build of commit `sha` in `project`, created if it does not exist yet; `created` says
 * whether this call made it.
 *
 * Parallel first uploads of one commit race here. `insert … on conflict (project_id, sha) do
 * nothing` lets exactly one insert win; every other caller waits for the winner's transaction
 * and then inserts nothing, so the select after it finds the build instead of failing on the
 * unique constraint. Pass the transaction's EntityManager when the caller writes more rows
 * that must commit with the build. `builtAt` (the CI's "time the build was made") is used only
 * when this call creates the build.
 */
export async function findOrCreateBuild(em: EntityManager, project: Project, sha: string, builtAt?: Date): Promise<{ build: Build; created: boolean }> {
  const existing = await em.findOne(Build, { project, sha });
  if (existing) return { build: existing, created: false };
  const now = new Date();
  // A query-builder insert runs no entity hooks: every not-null column without a default is given here.
  // `createdAt` is when the build was made: the CI's `builtAt` when it sent one, else now.
  const result = await em
    .createQueryBuilder(Build)
    .insert({ id: randomUUID(), project: project.id, sha, createdAt: builtAt ?? now, updatedAt: now })
    .onConflict(['project', 'sha'])
    .ignore()
    .execute('run');
  const build = await em.findOneOrFail(Build, { project, sha });
  return { build, created: result.affectedRows === 1 };
}
