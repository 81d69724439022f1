import { LockMode, UniqueConstraintViolationException, type EntityManager } from '@mikro-orm/postgresql';
import { Build, CheckResult, Finding, Verdict, Waiver } from '@earmark/db';
import { computeBuildStatus } from './build-aggregate.js';
import { coveredChecks, sameCoverage, waivedOutcome, waiverBasis, waiverMarkOf, withWaiverMark, type CoveringWaiver, type WaiverEvent } from './waiver-coverage.js';
import { ConflictError } from '../errors.js';
import { newestVerdicts, newestVerdictsCte } from '../repositories/verdicts.js';
import { recordAudit } from '../services/audit.service.js';
import { FINDING, moveTo } from '../rules/state-machines.js';

export interface RejudgeResult {
  /** Captures that got a new verdict. */
  captures: string[];
  /** Builds whose status was recomputed, with their status now. */
  builds: { sha: string; status: Build['status'] }[];
  /** Findings of re-judged results that opened again (their check is no longer waived). */
  reopened: Finding[];
}

/**
 * A waiver was approved, revoked or expired: every capture it governs (its project, test case
 * and check, and its target when scoped) whose newest verdict fails that check — or, when the
 * waiver ended, carries it — gets a new verdict with the same check results judged again
 * against the waivers active now, linked to the verdict it replaces; the builds' statuses are
 * recomputed and the findings pointing at the replaced results follow. Nothing is analysed
 * again: a waiver changes what a measurement means, not the measurement.
 *
 * Call inside the transaction that changes the waiver (after setting its state). The builds
 * concerned are locked as record-verdict locks them, and captures still being analysed are
 * waited for, so a verdict written concurrently is either seen here or judged after this
 * transaction with the new waiver state.
 * @throws ConflictError when another change re-judged the same captures at the same time
 */
export async function rejudgeWaiverScope(tx: EntityManager, waiver: Waiver, event: WaiverEvent, actor: string, now = new Date()): Promise<RejudgeResult> {
  const candidates = await governedCaptures(tx, waiver, event);
  // NOTE: the build locks come before this transaction writes any row (the flush below), in id
  // order: an analysis holding a build lock also updates findings, which must not be locked here yet.
  const builds = candidates.length
    ? await tx.find(Build, { id: { $in: [...new Set(candidates.map((c) => c.build_id))] } }, { orderBy: { id: 'asc' }, lockMode: LockMode.PESSIMISTIC_WRITE })
    : [];
  await tx.flush(); // the waiver's new state must be visible to the queries below
  if (candidates.length === 0) return { captures: [], builds: [], reopened: [] };

  // Re-read after the locks: an analysis that held one has committed its verdict by now.
  const newest = [...(await newestVerdicts(tx, candidates.map((c) => c.capture_id), ['maskRevision', 'capture'])).values()].filter((v) => v.outcome !== 'error');
  const resultsOf = new Map<string, CheckResult[]>();
  if (newest.length) {
    for (const r of await tx.find(CheckResult, { verdict: { $in: newest.map((v) => v.id) } }, { orderBy: { checkId: 'asc' } })) {
      resultsOf.set(r.verdict.id, [...(resultsOf.get(r.verdict.id) ?? []), r]);
    }
  }
  const active: CoveringWaiver[] = (
    await tx.find(Waiver, { project: waiver.project, testCase: waiver.testCase, state: 'approved', expiresAt: { $gt: now } })
  ).map((w) => ({ id: w.id, checkId: w.checkId, targetId: w.target?.id ?? null, expiresAt: w.expiresAt }));

  const rejudged: string[] = [];
  const reopened: Finding[] = [];
  const changedBuilds = new Set<string>();
  try {
    for (const replaced of newest) {
      const checks = resultsOf.get(replaced.id) ?? [];
      const governed = checks.find((c) => c.checkId === waiver.checkId);
      if (!governed || governed.pass) continue;
      const views = checks.map((c) => ({ id: c.checkId, pass: c.pass }));
      const covered = coveredChecks(views, active, replaced.capture.target.id);
      if (sameCoverage(appliedMarks(checks), covered)) continue;

      const judged = { outcome: views.some((c) => !c.pass) ? ('fail' as const) : ('pass' as const), reason: await analysisReason(tx, replaced) };
      const { outcome, reason } = waivedOutcome(judged, views, covered);
      const verdict = tx.create(Verdict, {
        capture: replaced.capture,
        maskRevision: replaced.maskRevision,
        outcome,
        reason,
        engineVersion: replaced.engineVersion,
        settings: replaced.settings,
        previous: replaced,
        waiverBasis: waiverBasis(covered, event),
      });
      const byCheck = new Map<string, CheckResult>();
      for (const c of checks) {
        byCheck.set(
          c.id,
          tx.create(CheckResult, {
            verdict,
            checkId: c.checkId,
            kind: c.kind,
            pass: c.pass,
            measured: c.measured,
            limit: c.limit,
            margin: c.margin,
            worstHz: c.worstHz,
            details: withWaiverMark(c.details, c.checkId, covered),
          }),
        );
      }
      reopened.push(...(await followFindings(tx, byCheck, covered, actor, waiver)));
      rejudged.push(replaced.capture.id);
      changedBuilds.add(replaced.capture.build.id);
    }
    await tx.flush();
  } catch (error) {
    // Queries in the loop flush what it wrote so far, so a clash can surface there too.
    if (error instanceof UniqueConstraintViolationException) {
      throw new ConflictError(`The captures of waiver ${waiver.id} were judged again by another change at the same time; reload and try again.`);
    }
    throw error;
  }
  const statuses: RejudgeResult['builds'] = [];
  for (const build of builds.filter((b) => changedBuilds.has(b.id))) {
    build.status = await computeBuildStatus(tx, build.id);
    statuses.push({ sha: build.sha, status: build.status });
  }
  await tx.flush();
  return { captures: rejudged, builds: statuses, reopened };
}

/** The waiver marks a stored verdict's checks carry, by check id. */
function appliedMarks(checks: readonly CheckResult[]): Map<string, { id: string }> {
  const marks = new Map<string, { id: string }>();
  for (const c of checks) {
    const mark = waiverMarkOf(c.details);
    if (mark) marks.set(c.checkId, mark);
  }
  return marks;
}

/**
 * Captures in the waiver's scope whose newest verdict fails its check (approval) or carries
 * it (the waiver ended), plus captures still queued or being analysed, whose build lock makes
 * this wait for a verdict being written.
 */
async function governedCaptures(tx: EntityManager, waiver: Waiver, event: WaiverEvent): Promise<{ capture_id: string; build_id: string }[]> {
  const ended = event.kind !== 'approved';
  return tx.getConnection().execute<{ capture_id: string; build_id: string }[]>(
    `with scope as (select c.id, c.build_id, c.status from capture c
                     where c.project_id = ? and c.test_case_id = ? ${waiver.target ? 'and c.target_id = ?' : ''}),
          newest as (${newestVerdictsCte('scope')})
     select scope.id as capture_id, scope.build_id from scope left join newest n on n.capture_id = scope.id
      where scope.status in ('queued', 'analysing')
         or exists (select 1 from check_result cr join verdict v on v.id = cr.verdict_id
                     where cr.verdict_id = n.id and cr.check_id = ? and not cr.pass and v.outcome <> 'error'
                       ${ended ? `and cr.details->'waived'->>'waiverId' = ?` : ''})`,
    [waiver.project.id, waiver.testCase.id, ...(waiver.target ? [waiver.target.id] : []), waiver.checkId, ...(ended ? [waiver.id] : [])],
    'all',
    tx.getTransactionContext(),
  );
}

/**
 * The analysis' own reason for failing, which a verdict passing with waiver no longer shows:
 * the replaced verdict's when it failed, else that of the newest failing verdict of the same
 * capture, revision and engine, else one listing the failing checks.
 */
async function analysisReason(tx: EntityManager, replaced: Verdict): Promise<string> {
  if (replaced.outcome === 'fail' && replaced.reason) return replaced.reason;
  const failed = await tx.findOne(
    Verdict,
    { capture: replaced.capture, maskRevision: replaced.maskRevision, engineVersion: replaced.engineVersion, outcome: 'fail', reason: { $ne: null } },
    { orderBy: { createdAt: 'desc', id: 'desc' } },
  );
  if (failed?.reason) return failed.reason;
  const results = await tx.find(CheckResult, { verdict: replaced }, { orderBy: { checkId: 'asc' } });
  const failing = results.filter((r) => !r.pass).map((r) => r.checkId);
  return `${failing.length} of ${results.length} checks failed: ${failing.join(', ')}`;
}

/**
 * Findings pointing at a replaced result point at its successor; one whose check is now
 * waived becomes an accepted deviation, one whose check no longer is opens again.
 * @returns the findings opened again
 */
async function followFindings(tx: EntityManager, successors: Map<string, CheckResult>, covered: ReadonlyMap<string, CoveringWaiver>, actor: string, waiver: Waiver): Promise<Finding[]> {
  const findings = await tx.find(Finding, { checkResult: { $in: [...successors.keys()] } }, { populate: ['assignee'] });
  const reopened: Finding[] = [];
  for (const finding of findings) {
    const next = successors.get(finding.checkResult!.id)!;
    finding.checkResult = next;
    const waivedNow = covered.has(finding.checkId);
    const to = waivedNow && (finding.state === 'open' || finding.state === 'investigating') ? 'accepted_deviation' : !waivedNow && finding.state === 'accepted_deviation' ? 'open' : null;
    if (!to) continue;
    const from = finding.state;
    moveTo(FINDING, finding, to, 'gate');
    if (to === 'open') reopened.push(finding);
    recordAudit(tx, {
      actor,
      action: to === 'open' ? 'finding.reopen' : 'finding.waive',
      subject: `finding:${finding.id}`,
      project: waiver.project,
      details: { from, to, waiverId: to === 'open' ? waiver.id : covered.get(finding.checkId)!.id },
    });
  }
  return reopened;
}
