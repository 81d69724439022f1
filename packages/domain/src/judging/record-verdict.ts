import { LockMode, UniqueConstraintViolationException, type EntityManager } from '@mikro-orm/postgresql';
import { Build, Capture, CheckResult, Finding, Verdict, type MaskRevision } from '@earmark/db';
import { computeBuildStatus } from './build-aggregate.js';
import { noteBuildFailure } from './build-failure-notice.js';
import { describeFailure, type Judgement } from './judgement.js';
import { settingsToRecord } from './judging-settings.js';
import { applyWaivers } from './waivers.js';
import { waiverBasis } from './waiver-coverage.js';
import { newestVerdict } from '../repositories/verdicts.js';
import { FINDING, moveTo } from '../rules/state-machines.js';

export interface RecordResult {
  /** False when this capture already had a verdict under this revision and engine (a re-run job). */
  written: boolean;
  notificationsQueued: number;
  /** Failing checks of the written verdict that an approved waiver covers (they change which plot the capture page opens on). */
  waivedCheckIds?: string[];
}

export interface RecordDeps {
  /** Link to a capture's page in the dashboard. */
  capturePage(project: string, sha: string, captureId: string): string;
  buildPage(project: string, sha: string): string;
  /** Where a member switches build mail on or off (the mail's footer links there). */
  settingsPage(project: string): string;
}

/**
 * Writes a verdict with its check results, the capture's status, the build's aggregate,
 * findings for failing checks and, once the build's status is final and failing, its one
 * build-failure mail (judging/build-failure-notice.ts) — all in one
 * transaction. Idempotent: a second call for the same capture, revision and engine version writes nothing;
 * a re-analysis a person asked for (`reanalysisId`) writes once per request, its basis naming it.
 */
export async function recordVerdict(
  em: EntityManager,
  captureId: string,
  mask: MaskRevision | null,
  analysed: Judgement,
  deps: RecordDeps,
  options: { reanalysisId?: string } = {},
): Promise<RecordResult> {
  const requestMark = options.reanalysisId ? `;reanalysis=${options.reanalysisId}` : '';
  try {
    return await em.transactional(async (tx) => {
      const capture = await tx.findOneOrFail(Capture, { id: captureId }, { populate: ['project', 'build', 'testCase', 'target'] });
      // The build row lock serialises captures of one build, so the aggregate and the
      // "turned failed" transition are decided once.
      const build = await tx.findOneOrFail(Build, { id: capture.build.id }, { lockMode: LockMode.PESSIMISTIC_WRITE });
      const already = requestMark
        ? await tx.findOne(Verdict, { capture, waiverBasis: { $like: `%${requestMark}` } })
        : await tx.findOne(Verdict, { capture, maskRevision: mask ? mask.id : null, engineVersion: analysed.engineVersion });
      if (already) {
        // A job that finds its verdict written (a re-run, or the sweep re-queuing a re-analysis whose
        // job was lost) leaves the capture showing its newest verdict, never waiting for ever.
        if (capture.status === 'queued' || capture.status === 'analysing') {
          const newest = await newestVerdict(tx, capture);
          if (newest) {
            capture.status = newest.outcome === 'error' ? 'error' : 'done';
            await tx.flush();
            build.status = await computeBuildStatus(tx, build.id);
          }
        }
        return { written: false, notificationsQueued: 0 };
      }
      // A retention run may have purged the audio while this analysis ran (it holds the row until it
      // commits): its verdicts stand, and a re-evaluation that lost the race must not replace them
      // with "cannot be read". Purged captures always have a verdict: retention skips unjudged ones.
      const [row] = await tx.getConnection().execute<Array<{ purged_at: Date | null }>>('select purged_at from capture where id = ? for update', [captureId], 'all', tx.getTransactionContext());
      if (row?.purged_at) return { written: false, notificationsQueued: 0 };
      const { judgement, waivers } = await applyWaivers(tx, capture, analysed);

      // A capture judged again (re-evaluation under a newer revision or engine) links to the verdict it replaces as the newest.
      const replaced = await newestVerdict(tx, capture);
      const verdict = tx.create(Verdict, {
        capture,
        maskRevision: mask ? mask.id : null,
        outcome: judgement.outcome,
        reason: judgement.reason,
        engineVersion: judgement.engineVersion,
        previous: replaced,
        // Which waivers judged it: a waiver approved, revoked or expired later re-judges it under another basis (rejudge-waivers).
        waiverBasis: waiverBasis(waivers) + requestMark,
        // The settings judging read (the revision's), so the verdict stays explainable after they change.
        settings: settingsToRecord(capture.testCase, mask),
      });
      const results = judgement.checks.map((c) =>
        tx.create(CheckResult, {
          verdict,
          checkId: c.id,
          kind: c.kind,
          pass: c.pass,
          measured: finite(c.measured),
          limit: finite(c.limit),
          margin: finite(c.margin),
          worstHz: finite(c.worstHz),
          details: { ...c.details, label: c.label, unit: c.unit },
        }),
      );
      capture.status = judgement.outcome === 'error' ? 'error' : 'done';
      await tx.flush();

      build.status = await computeBuildStatus(tx, build.id);

      const failing = judgement.checks.map((c, i) => ({ check: c, result: results[i]! })).filter(({ check }) => !check.pass);
      for (const { check, result } of failing) await openOrUpdateFinding(tx, capture, check.id, describeFailure(check), result, waivers.get(check.id)?.finding ?? null, waivers.has(check.id));

      // After the verdict, status and findings are written: the mail reads the build as it now stands.
      const notificationsQueued = await noteBuildFailure(tx, build, capture.project, deps);
      await tx.flush();
      return { written: true, notificationsQueued, waivedCheckIds: [...waivers.keys()] };
    });
  } catch (error) {
    // A concurrent run of the same job won the unique index: nothing to do.
    if (error instanceof UniqueConstraintViolationException) return { written: false, notificationsQueued: 0 };
    throw error;
  }
}

const finite = (v: number | null) => (v !== null && Number.isFinite(v) ? v : null);

/**
 * One open finding per branch, test case, target and check: a check that keeps failing across
 * builds of a branch updates its finding (newest capture) instead of opening another. A waived check
 * updates its waiver's finding (or the accepted deviation of this target) and opens one
 * as an accepted deviation only when there is none.
 */
async function openOrUpdateFinding(
  tx: EntityManager,
  capture: Capture,
  checkId: string,
  title: string,
  result: CheckResult,
  waiverFinding: Finding | null,
  waived: boolean,
): Promise<void> {
  const sameTarget = waiverFinding ? (await tx.populate(waiverFinding, ['capture'])).capture.target.id === capture.target.id : false;
  const existing =
    (sameTarget ? waiverFinding : null) ??
    (await tx.findOne(Finding, {
      project: capture.project,
      checkId,
      state: { $in: waived ? ['accepted_deviation', 'open', 'investigating'] : ['open', 'investigating'] },
      // Per branch: a feature branch's failure never moves main's finding off main (triage filters by branch).
      capture: { testCase: capture.testCase, target: capture.target, build: { branch: capture.build.branch } },
    }, { orderBy: { updatedAt: 'desc' } }));
  if (existing) {
    existing.capture = capture;
    existing.checkResult = result;
    existing.title = title;
    if (waived && (existing.state === 'open' || existing.state === 'investigating')) moveTo(FINDING, existing, 'accepted_deviation', 'gate');
    return;
  }
  tx.create(Finding, { project: capture.project, capture, checkResult: result, checkId, title, state: waived ? 'accepted_deviation' : 'open' });
}
