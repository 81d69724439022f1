import type { EntityManager } from '@mikro-orm/postgresql';
import type { BuildSummary, BuildsPage, BuildsQuery, BuildTrend } from '@earmark/contracts';
import type { Project } from '@earmark/db';
import { newestVerdictSql } from '../repositories/verdicts.js';

interface BuildRowSql {
  id: string;
  sha: string;
  label: string | null;
  branch: string | null;
  pipeline_url: string | null;
  status: BuildSummary['status'];
  created_at: Date;
  pass: string;
  fail: string;
  error: string;
  pending: string;
  waived: string;
  captures: string;
}

const SORT_SQL: Record<BuildsQuery['sort'], string> = {
  '-createdAt': 'created_at desc, id desc',
  createdAt: 'created_at asc, id asc',
  sha: 'sha asc',
  '-sha': 'sha desc',
  branch: 'branch asc nulls last, created_at desc',
  '-branch': 'branch desc nulls last, created_at desc',
  status: 'status asc, created_at desc',
  '-status': 'status desc, created_at desc',
};

export function toBuildSummary(row: BuildRowSql, projectKey: string): BuildSummary {
  return {
    id: row.id,
    projectKey,
    sha: row.sha,
    label: row.label,
    branch: row.branch,
    pipelineUrl: row.pipeline_url,
    status: row.status,
    createdAt: new Date(row.created_at).toISOString(),
    captureCount: Number(row.captures),
    counts: { pass: Number(row.pass), fail: Number(row.fail), error: Number(row.error), pending: Number(row.pending), waived: Number(row.waived) },
  };
}

// Verdict counts of each build on the page: one lateral look-up of each capture's newest verdict
// (`waived`: passes with a waived check, i.e. passed with waiver).
const WITH_COUNTS = `
  select p.id, p.sha, p.label, p.branch, p.pipeline_url, p.status, p.created_at,
         count(c.id) as captures,
         count(c.id) filter (where lv.outcome = 'pass') as pass,
         count(c.id) filter (where lv.outcome = 'fail') as fail,
         count(c.id) filter (where lv.outcome = 'error') as error,
         count(c.id) filter (where lv.outcome is null) as pending,
         count(c.id) filter (where lv.outcome = 'pass' and exists (select 1 from check_result cr where cr.verdict_id = lv.id and cr.details->'waived' is not null)) as waived
    from page p
    left join capture c on c.build_id = p.id
    left join lateral (select ${newestVerdictSql('c.id')} as outcome, ${newestVerdictSql('c.id', 'id')} as id) lv on true
   group by p.id, p.sha, p.label, p.branch, p.pipeline_url, p.status, p.created_at`;

/**
 * The builds table: filters and sort in SQL, one page at a time, verdict counts per build.
 * Uses the (project_id, created_at desc) index for the default order.
 */
export async function queryBuilds(em: EntityManager, project: Project, q: BuildsQuery): Promise<BuildsPage> {
  const where: string[] = ['b.project_id = ?'];
  const params: unknown[] = [project.id];
  if (q.sha) {
    where.push('b.sha like ?');
    params.push(`${q.sha}%`);
  }
  if (q.branch) {
    where.push('b.branch = ?');
    params.push(q.branch);
  }
  if (q.status) {
    where.push('b.status = ?');
    params.push(q.status);
  }
  if (q.target) {
    where.push('exists (select 1 from capture c join target t on t.id = c.target_id where c.build_id = b.id and t.key = ?)');
    params.push(q.target);
  }
  if (q.from) {
    where.push('b.created_at >= ?::date');
    params.push(q.from);
  }
  if (q.to) {
    where.push(`b.created_at < ?::date + interval '1 day'`);
    params.push(q.to);
  }
  const conn = em.getConnection();
  const filter = where.join(' and ');
  const [countRow] = await conn.execute<{ n: string }[]>(`select count(*) as n from build b where ${filter}`, params);
  const order = SORT_SQL[q.sort];
  const rows = await conn.execute<BuildRowSql[]>(
    `with page as (select b.* from build b where ${filter} order by ${order.replace(/(^|, )(\w+)/g, '$1b.$2')} limit ? offset ?)
     ${WITH_COUNTS} order by ${order}`,
    [...params, q.pageSize, (q.page - 1) * q.pageSize],
  );
  return { items: rows.map((r) => toBuildSummary(r, project.key)), total: Number(countRow?.n ?? 0), page: q.page, pageSize: q.pageSize };
}

/** One build as a summary (for headers). */
export async function buildSummary(em: EntityManager, project: Project, buildId: string): Promise<BuildSummary> {
  const rows = await em.getConnection().execute<BuildRowSql[]>(`with page as (select b.* from build b where b.id = ?) ${WITH_COUNTS}`, [buildId]);
  return toBuildSummary(rows[0]!, project.key);
}

/** Pass rate of the newest builds (oldest first) for the trend chart. */
export async function buildTrend(em: EntityManager, project: Project, limit = 50): Promise<BuildTrend> {
  const rows = await em.getConnection().execute<BuildRowSql[]>(
    `with page as (select b.* from build b where b.project_id = ? order by b.created_at desc limit ?) ${WITH_COUNTS} order by created_at asc`,
    [project.id, limit],
  );
  return {
    points: rows.map((r) => ({ sha: r.sha, createdAt: new Date(r.created_at).toISOString(), status: r.status, passed: Number(r.pass), total: Number(r.captures) })),
  };
}
