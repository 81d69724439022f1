import type { EntityManager } from '@mikro-orm/postgresql';
import { newestVerdictSql } from './verdicts.js';

/**
 * SQL: the newest capture of a test case on a target, in a build older than a moment, that is
 * done and whose newest verdict passed. Parameters: project id, test case id, target id, the moment.
 * Naming the project lets PostgreSQL walk the project's builds newest first on
 * (project_id, created_at desc) and stop at the first pass, instead of sorting the whole history.
 */
export const LAST_PASSING_SQL = `select c.id, b.sha, c.created_at from capture c join build b on b.id = c.build_id
        where b.project_id = ? and c.test_case_id = ? and c.target_id = ? and b.created_at < ? and c.status = 'done'
          and ${newestVerdictSql('c.id')} = 'pass'
        order by b.created_at desc limit 1`;

export interface LastPassing {
  captureId: string;
  buildSha: string;
  createdAt: string;
}

/** The last passing capture before a build (the capture page's comparison and plot overlay). */
export async function lastPassingCapture(em: EntityManager, where: { projectId: string; testCaseId: string; targetId: string; before: Date }): Promise<LastPassing | null> {
  const rows = await em.getConnection().execute<{ id: string; sha: string; created_at: Date }[]>(LAST_PASSING_SQL, [where.projectId, where.testCaseId, where.targetId, where.before]);
  const row = rows[0];
  return row ? { captureId: row.id, buildSha: row.sha, createdAt: new Date(row.created_at).toISOString() } : null;
}
