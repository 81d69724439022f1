import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import { Finding, Waiver, type Capture } from '@earmark/db';
import type { Judgement } from './judgement.js';
import { rejudgeWaiverScope, type RejudgeResult } from './rejudge-waivers.js';
import { coveredChecks, waivedOutcome, withWaiverMark, type WaiverEvent } from './waiver-coverage.js';
import { recordAudit } from '../services/audit.service.js';
import { composeWaiverExpiredMail } from '../mail/waiver-expired.mail.js';
import { writeToOutbox } from '../mail/outbox.js';
import { FINDING, WAIVER, moveTo } from '../rules/state-machines.js';

export interface WaivedJudgement {
  judgement: Judgement;
  /** Active waivers by check id, for the failing checks they cover. */
  waivers: Map<string, Waiver>;
}

/**
 * Applies the active waivers (approved, not yet expired) of this capture's test case and
 * target to a judgement. A covered failing check keeps `pass: false` and carries
 * `details.waived`; when every failing check is covered the outcome becomes `pass` with
 * reason "passed with waiver: <ids>". An `error` stays an error: a waiver accepts a known
 * deviation, never a check that could not be measured.
 */
export async function applyWaivers(em: EntityManager, capture: Capture, judgement: Judgement, now = new Date()): Promise<WaivedJudgement> {
  const failing = judgement.checks.filter((c) => !c.pass);
  if (judgement.outcome !== 'fail' || failing.length === 0) return { judgement, waivers: new Map() };
  const active = await em.find(
    Waiver,
    {
      project: capture.project,
      testCase: capture.testCase,
      checkId: { $in: failing.map((c) => c.id) },
      state: 'approved',
      expiresAt: { $gt: now },
      $or: [{ target: null }, { target: capture.target }],
    },
    { populate: ['finding'] },
  );
  const covered = coveredChecks(judgement.checks, active.map((w) => ({ id: w.id, checkId: w.checkId, targetId: w.target?.id ?? null, expiresAt: w.expiresAt })), capture.target.id);
  const waivers = new Map<string, Waiver>();
  for (const [checkId, cover] of covered) waivers.set(checkId, active.find((w) => w.id === cover.id)!);
  if (waivers.size === 0) return { judgement, waivers };

  const checks = judgement.checks.map((c) => (covered.has(c.id) ? { ...c, details: withWaiverMark(c.details, c.id, covered) } : c));
  return { judgement: { ...judgement, checks, ...waivedOutcome(judgement, judgement.checks, covered) }, waivers };
}

/**
 * Approved waivers past their date become `expired`: their finding (and any accepted
 * deviation of the same check that no other active waiver covers) is re-opened, the
 * captures they governed are judged again (failing again unless another waiver covers them)
 * with their builds' statuses, the transition is audited, and the finding's assignee — or the requester when nobody is
 * assigned — gets mail through the outbox. One transaction per run; rows are claimed with
 * SKIP LOCKED so two workers never expire one waiver twice.
 * @returns how many waivers expired
 */
export async function expireWaivers(em: EntityManager, now = new Date()): Promise<number> {
  return em.transactional(async (tx) => {
    const due = await tx.find(
      Waiver,
      { state: 'approved', expiresAt: { $lte: now } },
      { limit: 100, orderBy: { expiresAt: 'asc' }, lockMode: LockMode.PESSIMISTIC_PARTIAL_WRITE },
    );
    if (due.length === 0) return 0;
    await tx.populate(due, ['project', 'testCase', 'target', 'requestedBy', 'finding.assignee', 'finding.capture.target']);
    for (const waiver of due) {
      moveTo(WAIVER, waiver, 'expired', 'gate');
      const { reopened, rejudged } = await endWaiver(tx, waiver, { kind: 'expired', waiverId: waiver.id }, EXPIRY_ACTOR, now);
      audit(tx, waiver, 'waiver.expire', `waiver:${waiver.id}`, {
        from: 'approved',
        to: 'expired',
        comment: null,
        checkId: waiver.checkId,
        testCase: waiver.testCase.key,
        reopenedFindings: reopened.map((f) => f.id),
        rejudgedCaptures: rejudged.captures,
      });
      const recipient = waiver.finding?.assignee ?? waiver.requestedBy;
      const mail = composeWaiverExpiredMail({
        project: waiver.project,
        waiverId: waiver.id,
        testCase: waiver.testCase.key,
        checkId: waiver.checkId,
        target: waiver.target?.key ?? null,
        expiredAt: waiver.expiresAt,
        reason: waiver.reason,
        reopened,
        recipientIs: waiver.finding?.assignee ? 'assignee' : 'requester',
      });
      writeToOutbox(tx, mail, [recipient]);
    }
    await tx.flush();
    return due.length;
  });
}

const EXPIRY_ACTOR = 'system:waiver-expiry';

function audit(em: EntityManager, waiver: Waiver, action: string, subject: string, details: Record<string, unknown>) {
  recordAudit(em, { actor: EXPIRY_ACTOR, action, subject, project: waiver.project, details });
}

/**
 * What ending a waiver (expiry or revocation; its state already set) does besides mail: the
 * accepted deviations of its check that no other active waiver covers open again, and the
 * captures it governed are judged again at once (rejudge-waivers), so they fail where they
 * fail. Needs the waiver's project, test case, target and finding loaded.
 */
export async function endWaiver(tx: EntityManager, waiver: Waiver, event: WaiverEvent, actor: string, now = new Date()): Promise<{ reopened: Finding[]; rejudged: RejudgeResult }> {
  // Re-judging first: it takes the build locks before this transaction writes a finding.
  const rejudged = await rejudgeWaiverScope(tx, waiver, event, actor, now);
  const reopened: Finding[] = [...rejudged.reopened];
  const candidates = await tx.find(
    Finding,
    {
      project: waiver.project,
      checkId: waiver.checkId,
      state: 'accepted_deviation',
      capture: { testCase: waiver.testCase, ...(waiver.target ? { target: waiver.target } : {}) },
    },
    { populate: ['assignee', 'capture.target'] },
  );
  if (waiver.finding && waiver.finding.state === 'accepted_deviation' && !candidates.includes(waiver.finding)) candidates.push(waiver.finding);
  for (const finding of candidates) {
    await tx.populate(finding, ['capture.target']);
    const stillCovered = await tx.count(Waiver, {
      id: { $ne: waiver.id },
      project: waiver.project,
      testCase: waiver.testCase,
      checkId: waiver.checkId,
      state: 'approved',
      expiresAt: { $gt: now },
      $or: [{ target: null }, { target: finding.capture.target }],
    });
    if (stillCovered > 0) continue;
    moveTo(FINDING, finding, 'open', 'gate');
    reopened.push(finding);
    recordAudit(tx, { actor, action: 'finding.reopen', subject: `finding:${finding.id}`, project: waiver.project, details: { from: 'accepted_deviation', to: 'open', waiverId: waiver.id } });
  }
  return { reopened, rejudged };
}
