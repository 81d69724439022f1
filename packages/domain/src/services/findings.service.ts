import type { EntityManager } from '@mikro-orm/postgresql';
import { findingTitle, type CommentRow, type FindingRow, type FindingsPage, type FindingsQuery, type UpdateFindingRequest } from '@earmark/contracts';
import { Comment, Finding, Membership, User, type Project } from '@earmark/db';
import { NotFoundError, ValidationError } from '../errors.js';
import { recordAudit } from './audit.service.js';
import { FINDING, moveTo } from '../rules/state-machines.js';
import { findingHistory } from '../judging/failure-history.js';

interface FindingSql {
  id: string;
  title: string;
  check_id: string;
  state: FindingRow['state'];
  test_case: string;
  target: string;
  build_sha: string;
  capture_id: string;
  assignee_id: string | null;
  assignee_name: string | null;
  assignee_email: string | null;
  margin: number | null;
  unit: string | null;
  worst_hz: number | null;
  comments: string;
  created_at: Date;
  updated_at: Date;
  branch: string | null;
  check_kind: string | null;
  check_label: string | null;
}

/** One build of a finding's cell on its branch: did the check fail there (newest capture, newest verdict). */
interface HistorySql {
  finding_id: string;
  sha: string;
  created_at: Date;
  pass: boolean;
  /** When an earlier finding of the same check and cell was closed; null if none. */
  closed_before: Date | null;
}

const SELECT = `
  select f.id, f.title, f.check_id, f.state, tc.key as test_case, t.key as target, b.sha as build_sha, c.id as capture_id,
         u.id as assignee_id, u.display_name as assignee_name, u.email as assignee_email,
         cr.margin, cr.details->>'unit' as unit, cr.worst_hz,
         (select count(*) from comment m where m.finding_id = f.id) as comments,
         f.created_at, f.updated_at, b.branch, cr.kind as check_kind, cr.details->>'label' as check_label
    from finding f
    join capture c on c.id = f.capture_id
    join build b on b.id = c.build_id
    join test_case tc on tc.id = c.test_case_id
    join target t on t.id = c.target_id
    left join app_user u on u.id = f.assignee_id
    left join check_result cr on cr.id = f.check_result_id`;

const toRow = (r: FindingSql): FindingRow => ({
  id: r.id,
  // Rendered from the structured fields (the stored sentence keeps the wording of its day); without a check result, the stored one.
  title: r.check_kind === null ? r.title : findingTitle({ checkId: r.check_id, checkKind: r.check_kind, checkLabel: r.check_label, margin: r.margin, unit: r.unit, worstHz: r.worst_hz }),
  checkId: r.check_id,
  state: r.state,
  testCase: r.test_case,
  target: r.target,
  buildSha: r.build_sha,
  captureId: r.capture_id,
  assignee: r.assignee_id ? { id: r.assignee_id, displayName: r.assignee_name ?? '', email: r.assignee_email ?? '' } : null,
  margin: r.margin,
  unit: r.unit,
  worstHz: r.worst_hz,
  commentCount: Number(r.comments),
  createdAt: new Date(r.created_at).toISOString(),
  updatedAt: new Date(r.updated_at).toISOString(),
  branch: r.branch,
  checkKind: r.check_kind,
  checkLabel: r.check_label,
});

/**
 * Per finding: its check's outcome in the newest capture of its test case × target in every build of
 * its branch, oldest first, with the moment an earlier finding of the same check and cell was closed.
 */
const HISTORY = `
  with f as (
    select f.id, f.check_id, f.created_at, c.test_case_id, c.target_id, b.branch, f.project_id
      from finding f join capture c on c.id = f.capture_id join build b on b.id = c.build_id
     where f.id = any(?::uuid[])),
  cell as (
    select distinct on (f.id, c.build_id) f.id as finding_id, f.check_id, c.id as capture_id, b.sha, b.created_at
      from f
      join build b on b.project_id = f.project_id and b.branch is not distinct from f.branch
      join capture c on c.build_id = b.id and c.test_case_id = f.test_case_id and c.target_id = f.target_id
     order by f.id, c.build_id, c.created_at desc)
  select cell.finding_id, cell.sha, cell.created_at, cr.pass,
         (select max(p.updated_at) from finding p join capture pc on pc.id = p.capture_id
           where p.project_id = f.project_id and p.check_id = f.check_id and pc.test_case_id = f.test_case_id
             and pc.target_id = f.target_id and p.state in ('fixed', 'not_a_defect') and p.created_at < f.created_at) as closed_before
    from cell
    join f on f.id = cell.finding_id
    join lateral (select v.id from verdict v where v.capture_id = cell.capture_id order by v.created_at desc, v.id desc limit 1) v on true
    join check_result cr on cr.verdict_id = v.id and cr.check_id = cell.check_id
   order by cell.finding_id, cell.created_at asc`;

/** First sighting, occurrences and the current failing streak of each finding, from its branch's history. */
async function withHistory(em: EntityManager, rows: FindingRow[]): Promise<FindingRow[]> {
  if (rows.length === 0) return rows;
  const history = await em.getConnection().execute<HistorySql[]>(HISTORY, [`{${rows.map((r) => r.id).join(',')}}`]);
  const byFinding = new Map<string, HistorySql[]>();
  for (const h of history) byFinding.set(h.finding_id, [...(byFinding.get(h.finding_id) ?? []), h]);
  const ref = (p: { sha: string; createdAt: Date } | null) => (p ? { sha: p.sha, createdAt: p.createdAt.toISOString() } : null);
  return rows.map((row) => {
    const points = (byFinding.get(row.id) ?? []).map((h) => ({ sha: h.sha, createdAt: new Date(h.created_at), pass: h.pass }));
    const closed = byFinding.get(row.id)?.[0]?.closed_before ?? null;
    const h = findingHistory(points, closed ? new Date(closed) : null);
    return { ...row, firstSeen: ref(h.firstSeen), occurrences: h.occurrences, failingSince: ref(h.failingSince) };
  });
}

/** The findings queue: filtering, triage (assignee, state), bulk changes and comments. */
export class FindingsService {
  async list(em: EntityManager, project: Project, q: FindingsQuery, me: User): Promise<FindingsPage> {
    const where = ['f.project_id = ?'];
    const params: unknown[] = [project.id];
    const add = (clause: string, ...values: unknown[]) => {
      where.push(clause);
      params.push(...values);
    };
    if (q.state === 'active') add(`f.state in ('open', 'investigating')`);
    else if (q.state) add('f.state = ?', q.state);
    if (q.assignee === 'none') add('f.assignee_id is null');
    else if (q.assignee) add('f.assignee_id::text = ?', q.assignee === 'me' ? me.id : q.assignee);
    if (q.testCase) add('tc.key = ?', q.testCase);
    if (q.target) add('t.key = ?', q.target);
    if (q.captureId) add('c.id = ?', q.captureId);
    if (q.branch) add('b.branch = ?', q.branch);
    const conn = em.getConnection();
    const filter = where.join(' and ');
    const [count] = await conn.execute<{ n: string }[]>(
      `select count(*) as n from finding f join capture c on c.id = f.capture_id join build b on b.id = c.build_id join test_case tc on tc.id = c.test_case_id join target t on t.id = c.target_id where ${filter}`,
      params,
    );
    const rows = await conn.execute<FindingSql[]>(`${SELECT} where ${filter} order by f.updated_at desc limit ? offset ?`, [...params, q.pageSize, (q.page - 1) * q.pageSize]);
    return { items: await withHistory(em, rows.map(toRow)), total: Number(count?.n ?? 0), page: q.page, pageSize: q.pageSize };
  }

  async rows(em: EntityManager, ids: string[]): Promise<FindingRow[]> {
    if (ids.length === 0) return [];
    const rows = await em.getConnection().execute<FindingSql[]>(`${SELECT} where f.id in (${ids.map(() => '?').join(',')}) order by f.updated_at desc`, ids);
    return withHistory(em, rows.map(toRow));
  }

  /**
   * @throws NotFoundError for a finding of another project; ValidationError for an assignee who
   * is no member, or for `accepted_deviation`, which only an approved waiver sets (a second person decides it).
   */
  async update(em: EntityManager, project: Project, ids: string[], change: UpdateFindingRequest, actor: User): Promise<FindingRow[]> {
    if (change.state === 'accepted_deviation') {
      throw new ValidationError('A finding becomes an accepted deviation only through an approved waiver: request a waiver for it instead.', [
        { path: 'body.state', message: 'accepted_deviation is set by an approved waiver; request one' },
      ]);
    }
    const findings = await em.find(Finding, { id: { $in: ids }, project });
    if (findings.length !== new Set(ids).size) throw new NotFoundError(`Some of these findings do not exist in ${project.key}.`);
    let assignee: User | null | undefined;
    if (change.assigneeId !== undefined) {
      assignee = change.assigneeId === null ? null : await this.member(em, project, change.assigneeId);
    }
    for (const f of findings) {
      const before = { state: f.state, assignee: f.assignee?.id ?? null };
      if (change.state) moveTo(FINDING, f, change.state, 'person');
      if (assignee !== undefined) f.assignee = assignee;
      f.updatedAt = new Date();
      recordAudit(em, { actor: `user:${actor.email}`, action: 'finding.update', subject: `finding:${f.id}`, project, details: { before, after: { state: f.state, assignee: f.assignee?.id ?? null } } });
    }
    await em.flush();
    return this.rows(em, findings.map((f) => f.id));
  }

  private async member(em: EntityManager, project: Project, userId: string): Promise<User> {
    const membership = await em.findOne(Membership, { project, user: userId }, { populate: ['user'] });
    if (membership) return membership.user;
    const admin = await em.findOne(User, { id: userId, isAdmin: true });
    if (admin) return admin;
    throw new ValidationError(`That user is not a member of ${project.key}.`, [{ path: 'body.assigneeId', message: 'not a member of the project' }]);
  }

  async comments(em: EntityManager, project: Project, findingId: string): Promise<CommentRow[]> {
    const finding = await em.findOne(Finding, { id: findingId, project });
    if (!finding) throw new NotFoundError(`There is no finding ${findingId} in ${project.key}.`);
    const comments = await em.find(Comment, { finding }, { populate: ['author'], orderBy: { createdAt: 'asc' } });
    return comments.map((c) => ({ id: c.id, author: { id: c.author.id, displayName: c.author.displayName }, body: c.body, createdAt: c.createdAt.toISOString() }));
  }

  async addComment(em: EntityManager, project: Project, findingId: string, body: string, author: User): Promise<CommentRow> {
    const finding = await em.findOne(Finding, { id: findingId, project });
    if (!finding) throw new NotFoundError(`There is no finding ${findingId} in ${project.key}.`);
    const comment = em.create(Comment, { finding, author, body });
    finding.updatedAt = new Date();
    recordAudit(em, { actor: `user:${author.email}`, action: 'finding.comment', subject: `finding:${finding.id}`, project });
    await em.flush();
    return { id: comment.id, author: { id: author.id, displayName: author.displayName }, body: comment.body, createdAt: comment.createdAt.toISOString() };
  }
}

