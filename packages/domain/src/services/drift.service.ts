import type { EntityManager } from '@mikro-orm/postgresql';
import { driftFlagOf, type DriftFlag, type DriftQuery, type DriftResponse, type DriftSeries } from '@earmark/contracts';
import type { Build, Project } from '@earmark/db';

interface MarginRow {
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
}

/**
 * Per build of the window (the last `window` builds of the branch up to `until`), the newest
 * capture of each test case × target, its newest verdict and that verdict's check results.
 * Oldest first.
 */
async function marginRows(em: EntityManager, project: Project, branch: string, window: number, until: Date | null, q: Partial<DriftQuery> = {}): Promise<MarginRow[]> {
  return em.getConnection().execute<MarginRow[]>(
    `with win as (
       select b.id, b.sha, b.created_at from build b
        where b.project_id = ? and b.branch = ? and (?::timestamptz is null or b.created_at <= ?::timestamptz)
        order by b.created_at desc limit ?),
     cell as (
       select distinct on (c.build_id, c.test_case_id, c.target_id) c.id, c.build_id, c.test_case_id, c.target_id
         from capture c join win on win.id = c.build_id
        order by c.build_id, c.test_case_id, c.target_id, c.created_at desc),
     newest as (
       select distinct on (v.capture_id) v.id, v.capture_id, v.mask_revision_id
         from verdict v join cell on cell.id = v.capture_id
        order by v.capture_id, v.created_at desc)
     select win.sha, win.created_at, cell.id as capture_id, tc.key as test_case, t.key as target,
            cr.check_id, cr.pass, cr.margin, cr.details->>'unit' as unit, mr.revision
       from newest n
       join cell on cell.id = n.capture_id
       join win on win.id = cell.build_id
       join test_case tc on tc.id = cell.test_case_id
       join target t on t.id = cell.target_id
       join check_result cr on cr.verdict_id = n.id
       left join mask_revision mr on mr.id = n.mask_revision_id
      where (?::text is null or tc.key = ?) and (?::text is null or t.key = ?) and (?::text is null or cr.check_id = ?)
      order by win.created_at asc, tc.key, t.key, cr.check_id`,
    [project.id, branch, until, until, window, q.testCase ?? null, q.testCase ?? null, q.target ?? null, q.target ?? null, q.checkId ?? null, q.checkId ?? null],
  );
}

function seriesOf(rows: MarginRow[], thresholdDb: number): DriftSeries[] {
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

/**
 * Drift of check margins along a branch: a passing check whose margin is now more than
 * `project.driftThresholdDb` below its best in the last `project.driftWindow` builds is flagged
 * (dB and dBFS checks only; contracts' driftFlagOf).
 */
export class DriftService {
  async series(em: EntityManager, project: Project, q: DriftQuery): Promise<DriftResponse> {
    const rows = await marginRows(em, project, q.branch, project.driftWindow, null, q);
    return { branch: q.branch, window: project.driftWindow, thresholdDb: project.driftThresholdDb, series: seriesOf(rows, project.driftThresholdDb) };
  }

  /** Flags for the window ending at `build` on its branch; none for a build without a branch. */
  async flagsAt(em: EntityManager, project: Project, build: Build): Promise<DriftFlag[]> {
    if (!build.branch) return [];
    const rows = await marginRows(em, project, build.branch, project.driftWindow, build.createdAt);
    // Only series whose newest point is this build: a check that was not measured here does not drift here.
    return seriesOf(rows, project.driftThresholdDb)
      .map((s) => s.flag)
      .filter((f): f is DriftFlag => f !== null && f.latestSha === build.sha);
  }
}
