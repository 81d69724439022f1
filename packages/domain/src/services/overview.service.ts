import type { EntityManager } from '@mikro-orm/postgresql';
import { BuildsQuery, MAIN_BRANCH, type AwaitingItem, type BranchTrend, type BuildStatus, type FailingCheck, type ProjectOverview } from '@earmark/contracts';
import { Build, MaskRevision, Waiver, type Project, type User } from '@earmark/db';
import { currentFailingStreak } from '../judging/failure-history.js';
import { driftFlagsAt, driftMargins, type DriftMarginRow } from '../repositories/drift.js';
import { contributorsOf, maskUnderReview, waiverUnderReview } from '../rules/four-eyes.js';
import { queryBuilds } from './builds-query.service.js';

/** Trend marks per branch, and how many branches the overview lists. */
const TREND_MARKS = 12;
const BRANCHES_SHOWN = 6;
/** How far back main's history is read to find where a failing streak began. */
const STREAK_HISTORY_BUILDS = 200;

/** Who is looking, and which decisions their role allows (the API's permission matrix answers that). */
export interface OverviewViewer {
  user: Pick<User, 'id' | 'email'>;
  mayDecideRevisions: boolean;
  mayDecideWaivers: boolean;
}

interface TrendSql {
  branch: string;
  sha: string;
  status: BuildStatus;
  created_at: Date;
  builds: string;
}

async function branchTrends(em: EntityManager, project: Project): Promise<BranchTrend[]> {
  const rows = await em.getConnection().execute<TrendSql[]>(
    `with ranked as (
       select b.branch, b.sha, b.status, b.created_at,
              row_number() over (partition by b.branch order by b.created_at desc, b.id desc) as n,
              count(*) over (partition by b.branch) as builds
         from build b where b.project_id = ? and b.branch is not null)
     select branch, sha, status, created_at, builds from ranked where n <= ? order by branch, created_at asc`,
    [project.id, TREND_MARKS],
  );
  const byBranch = new Map<string, BranchTrend>();
  for (const r of rows) {
    const mark = { sha: r.sha, status: r.status, createdAt: new Date(r.created_at).toISOString() };
    const trend = byBranch.get(r.branch) ?? { branch: r.branch, latest: mark, marks: [], builds: Number(r.builds) };
    trend.marks.push(mark);
    trend.latest = mark;
    byBranch.set(r.branch, trend);
  }
  return [...byBranch.values()]
    .sort((a, b) => Number(b.branch === MAIN_BRANCH) - Number(a.branch === MAIN_BRANCH) || b.latest.createdAt.localeCompare(a.latest.createdAt))
    .slice(0, BRANCHES_SHOWN);
}

/** Checks failing in main's newest capture of each cell, each with the build its failing streak began. */
export function failingChecks(rows: readonly DriftMarginRow[]): FailingCheck[] {
  const series = new Map<string, DriftMarginRow[]>();
  for (const r of rows) {
    const key = `${r.test_case}\u0000${r.target}\u0000${r.check_id}`;
    series.set(key, [...(series.get(key) ?? []), r]);
  }
  const failing: FailingCheck[] = [];
  for (const points of series.values()) {
    const streak = currentFailingStreak(points.map((p) => ({ ...p, createdAt: p.created_at })));
    if (!streak) continue;
    const latest = streak.latest;
    failing.push({
      testCase: latest.test_case,
      target: latest.target,
      checkId: latest.check_id,
      label: latest.label,
      kind: latest.kind,
      margin: latest.margin,
      unit: latest.unit,
      worstHz: latest.worst_hz,
      captureId: latest.capture_id,
      latest: { sha: latest.sha, createdAt: new Date(latest.created_at).toISOString() },
      since: { sha: streak.since.sha, createdAt: new Date(streak.since.created_at).toISOString() },
      streak: streak.length,
    });
  }
  // The longest-failing first: what has been broken longest is read first.
  return failing.sort((a, b) => a.since.createdAt.localeCompare(b.since.createdAt) || a.testCase.localeCompare(b.testCase) || a.checkId.localeCompare(b.checkId));
}

/** Revisions in review and waiver requests the viewer may decide: their role allows it and the four-eyes rule does not bar them. */
async function awaitingDecision(em: EntityManager, project: Project, viewer: OverviewViewer): Promise<AwaitingItem[]> {
  const items: AwaitingItem[] = [];
  if (viewer.mayDecideRevisions) {
    const revisions = await em.find(MaskRevision, { testCase: { project }, state: 'in_review' }, { populate: ['testCase', 'author'], orderBy: { submittedAt: 'asc' } });
    for (const r of revisions) {
      if (contributorsOf(maskUnderReview(r)).includes(viewer.user.id)) continue;
      items.push({ kind: 'revision', id: r.id, testCase: r.testCase.key, subject: `revision ${r.revision}`, requestedBy: r.author.email, requestedAt: (r.submittedAt ?? r.createdAt).toISOString() });
    }
  }
  if (viewer.mayDecideWaivers) {
    const waivers = await em.find(Waiver, { project, state: 'requested' }, { populate: ['testCase', 'requestedBy'], orderBy: { createdAt: 'asc' } });
    for (const w of waivers) {
      if (contributorsOf(waiverUnderReview(w)).includes(viewer.user.id)) continue;
      items.push({ kind: 'waiver', id: w.id, testCase: w.testCase.key, subject: w.checkId, requestedBy: w.requestedBy.email, requestedAt: w.createdAt.toISOString() });
    }
  }
  return items;
}

/** Findings open or under investigation whose newest capture is on main: the Findings menu's count. */
async function openFindingsOnMain(em: EntityManager, project: Project): Promise<number> {
  const [row] = await em.getConnection().execute<{ n: string }[]>(
    `select count(*) as n from finding f join capture c on c.id = f.capture_id join build b on b.id = c.build_id
      where f.project_id = ? and f.state in ('open', 'investigating') and b.branch = ?`,
    [project.id, MAIN_BRANCH],
  );
  return Number(row?.n ?? 0);
}

/**
 * The project's landing page: is main green, each branch's trend, what fails on main and since
 * which build, which bands drift, and what awaits the viewer's decision.
 */
export async function projectOverview(em: EntityManager, project: Project, viewer: OverviewViewer): Promise<ProjectOverview> {
  const [newestMain] = (await queryBuilds(em, project, BuildsQuery.parse({ branch: MAIN_BRANCH, pageSize: 1 }))).items;
  const mainBuild = newestMain ? await em.findOne(Build, { project, sha: newestMain.sha }) : null;
  // One after another: they share the request's entity manager.
  const branches = await branchTrends(em, project);
  const history = await driftMargins(em, project, { branch: MAIN_BRANCH, window: STREAK_HISTORY_BUILDS, until: null });
  const drifting = mainBuild ? await driftFlagsAt(em, project, mainBuild) : [];
  const awaiting = await awaitingDecision(em, project, viewer);
  const openOnMain = await openFindingsOnMain(em, project);
  return {
    mainBranch: MAIN_BRANCH,
    main: newestMain ? { sha: newestMain.sha, status: newestMain.status, createdAt: newestMain.createdAt, counts: newestMain.counts } : null,
    branches,
    failing: failingChecks(history),
    drifting,
    awaiting,
    counts: { awaitingYou: awaiting.length, openFindingsOnMain: openOnMain },
  };
}
