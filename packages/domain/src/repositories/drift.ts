import { driftFlagOf, type DriftFlag, type DriftQuery, type DriftSeries } from '@earmark/contracts';
import type { Build, Project } from '@earmark/db';
import type { EntityManager } from '@mikro-orm/postgresql';
import { newestVerdictsCte } from './verdicts.js';

export interface DriftMarginRow {
  sha: string;
  created_at: Date;
  capture_id: string;
  test_case: string;
  target: string;
  check_id: string;
  pass: boolean;
  margin: number | null;
  unit: string | null;
  revision: number | null;
  /** The check's kind and mask label, and where it was worst (the overview names failing checks with them). */
  kind: string;
  label: string | null;
  worst_hz: number | null;
}

export interface DriftWindow {
  branch: string;
  /** How many builds of the branch, newest first, up to `until` (inclusive; null = now). */
  window: number;
  until: Date | null;
  /** Narrow to one cell or check (keys). */
  only?: Partial<Pick<DriftQuery, 'testCase' | 'target' | 'checkId'>>;
}

/**
 * Check margins along a branch: per build of the window, the newest capture of each test case ×
 * target, its newest verdict and that verdict's check results, oldest build first. The drift
 * page, the build matrix's flags and the drift mail all read this one selection.
 */
export function driftMargins(em: EntityManager, project: Project, { branch, window, until, only = {} }: DriftWindow): Promise<DriftMarginRow[]> {
  return em.getConnection().execute<DriftMarginRow[]>(
    `with win as (
       select b.id, b.sha, b.created_at from build b
        where b.project_id = ? and b.branch = ? and (?::timestamptz is null or b.created_at <= ?::timestamptz)
        order by b.created_at desc limit ?),
     cell as (
       select distinct on (c.build_id, c.test_case_id, c.target_id) c.id, c.build_id, c.test_case_id, c.target_id
         from capture c join win on win.id = c.build_id
        order by c.build_id, c.test_case_id, c.target_id, c.created_at desc),
     newest as (${newestVerdictsCte('cell')})
     select win.sha, win.created_at, cell.id as capture_id, tc.key as test_case, t.key as target,
            cr.check_id, cr.pass, cr.margin, cr.details->>'unit' as unit, mr.revision,
            cr.kind, cr.details->>'label' as label, cr.worst_hz
       from newest n
       join cell on cell.id = n.capture_id
       join win on win.id = cell.build_id
       join test_case tc on tc.id = cell.test_case_id
       join target t on t.id = cell.target_id
       join check_result cr on cr.verdict_id = n.id
       left join mask_revision mr on mr.id = n.mask_revision_id
      where (?::text is null or tc.key = ?) and (?::text is null or t.key = ?) and (?::text is null or cr.check_id = ?)
      order by win.created_at asc, tc.key, t.key, cr.check_id`,
    [project.id, branch, until, until, window, only.testCase ?? null, only.testCase ?? null, only.target ?? null, only.target ?? null, only.checkId ?? null, only.checkId ?? null],
  );
}

/** Margin rows grouped into one series per test case × target × check, each with its drift flag. */
export function driftSeries(rows: readonly DriftMarginRow[], thresholdDb: number): DriftSeries[] {
  const bySeries = new Map<string, DriftSeries>();
  for (const r of rows) {
    const key = `${r.test_case}\u0000${r.target}\u0000${r.check_id}`;
    let s = bySeries.get(key);
    if (!s) {
      s = { testCase: r.test_case, target: r.target, checkId: r.check_id, unit: r.unit, points: [], flag: null };
      bySeries.set(key, s);
    }
    s.points.push({ sha: r.sha, createdAt: new Date(r.created_at).toISOString(), captureId: r.capture_id, pass: r.pass, margin: r.margin, maskRevision: r.revision });
  }
  for (const s of bySeries.values()) s.flag = driftFlagOf(s, s.points, thresholdDb);
  return [...bySeries.values()];
}

/** Drift flags for the window ending at `build` on its branch (only series whose newest point is this build); none without a branch. */
export async function driftFlagsAt(em: EntityManager, project: Project, build: Build, only: DriftWindow['only'] = {}): Promise<DriftFlag[]> {
  if (!build.branch) return [];
  const rows = await driftMargins(em, project, { branch: build.branch, window: project.driftWindow, until: build.createdAt, only });
  return driftSeries(rows, project.driftThresholdDb)
    .map((s) => s.flag)
    .filter((f): f is DriftFlag => f !== null && f.latestSha === build.sha);
}
