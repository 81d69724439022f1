import { driftFlagOf, type DriftFlag } from '@earmark/contracts';
import { Build, Capture, Membership, Notification } from '@earmark/db';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { RecordDeps } from './record-verdict.js';

interface Row {
  sha: string;
  check_id: string;
  pass: boolean;
  margin: number | null;
  unit: string | null;
}

/**
 * Margins of one test case × target over the last `window` builds of a branch up to `until`
 * (newest capture per build, its newest verdict), oldest first. The API's drift service runs the
 * same selection for every cell of the branch.
 */
async function margins(em: EntityManager, capture: Capture, branch: string, window: number, until: Date): Promise<Row[]> {
  return em.getConnection().execute<Row[]>(
    `with win as (select b.id, b.sha, b.created_at from build b where b.project_id = ? and b.branch = ? and b.created_at <= ?
                   order by b.created_at desc limit ?),
          cell as (select distinct on (c.build_id) c.id, c.build_id from capture c join win on win.id = c.build_id
                    where c.test_case_id = ? and c.target_id = ? order by c.build_id, c.created_at desc),
          newest as (select distinct on (v.capture_id) v.id, v.capture_id from verdict v join cell on cell.id = v.capture_id
                      order by v.capture_id, v.created_at desc)
     select win.sha, cr.check_id, cr.pass, cr.margin, cr.details->>'unit' as unit
       from newest n join cell on cell.id = n.capture_id join win on win.id = cell.build_id
       join check_result cr on cr.verdict_id = n.id
      order by win.created_at asc`,
    [capture.project.id, branch, until, window, capture.testCase.id, capture.target.id],
  );
}

function flagsOf(rows: Row[], capture: Capture, sha: string, thresholdDb: number): DriftFlag[] {
  const byCheck = new Map<string, Row[]>();
  for (const r of rows) byCheck.set(r.check_id, [...(byCheck.get(r.check_id) ?? []), r]);
  return [...byCheck.entries()]
    .map(([checkId, points]) => driftFlagOf({ testCase: capture.testCase.key, target: capture.target.key, checkId, unit: points[0]?.unit ?? null }, points, thresholdDb))
    .filter((f): f is DriftFlag => f !== null && f.latestSha === sha);
}

/**
 * After a verdict on the newest build of a branch: when this capture's cell newly drifts there
 * (flagged at this build, not at the previous build of the branch), subscribed members get one mail per check through the outbox.
 * Idempotent: a mail already written for this build, cell and check is not written again.
 * @returns the number of mails written
 */
export async function noteDrift(em: EntityManager, captureId: string, deps: RecordDeps): Promise<number> {
  const capture = await em.findOneOrFail(Capture, { id: captureId }, { populate: ['project', 'build', 'testCase', 'target'] });
  const { build, project } = capture;
  if (!build.branch) return 0;
  // Drift is news about the head of a branch; re-judging an older build (re-evaluation) announces nothing.
  if (await em.count(Build, { project, branch: build.branch, createdAt: { $gt: build.createdAt } })) return 0;
  const flags = flagsOf(await margins(em, capture, build.branch, project.driftWindow, build.createdAt), capture, build.sha, project.driftThresholdDb);
  if (flags.length === 0) return 0;
  const before = await em.findOne(Build, { project, branch: build.branch, createdAt: { $lt: build.createdAt } }, { orderBy: { createdAt: 'desc' } });
  const earlier = before ? flagsOf(await margins(em, capture, build.branch, project.driftWindow, before.createdAt), capture, before.sha, project.driftThresholdDb) : [];
  const fresh = flags.filter((f) => !earlier.some((e) => e.checkId === f.checkId));
  if (fresh.length === 0) return 0;
  const subscribers = (await em.find(Membership, { project, subscribed: true }, { populate: ['user'] })).filter((m) => !m.user.disabled);
  let written = 0;
  for (const flag of fresh) {
    const payload = { project: project.key, sha: build.sha, testCase: flag.testCase, target: flag.target, checkId: flag.checkId };
    const [seen] = await em.getConnection().execute<{ n: string }[]>(
      `select count(*) as n from notification where kind = 'drift' and payload @> ?::jsonb`,
      [JSON.stringify(payload)],
    );
    if (Number(seen?.n ?? 0) > 0) continue;
    for (const m of subscribers) {
      em.create(Notification, {
        kind: 'drift',
        recipient: m.user.email,
        subject: `[Earmark] ${project.key} ${build.branch}: ${flag.checkId} on ${flag.testCase}/${flag.target} is drifting`,
        body: [
          `The margin of check ${flag.checkId} (${flag.testCase} on ${flag.target}) still passes but shrank by ${flag.shrinkDb.toFixed(2)} dB`,
          `over the last ${flag.builds} builds of ${build.branch}: from ${flag.bestMargin.toFixed(2)} dB (build ${flag.bestSha.slice(0, 10)}) to ${flag.latestMargin.toFixed(2)} dB (build ${build.sha.slice(0, 10)}).`,
          `The project flags a shrink of more than ${flag.thresholdDb} dB.`,
          '',
          `Open the build: ${deps.buildPage(project.key, build.sha)}`,
          '',
          'You get this because you subscribed to this project in Earmark.',
        ].join('\n'),
        payload,
      });
      written += 1;
    }
  }
  await em.flush();
  return written;
}
