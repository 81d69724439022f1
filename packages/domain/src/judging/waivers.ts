import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import { AuditEvent, Finding, Notification, Waiver, type Capture } from '@earmark/db';
import type { Judgement } from './judgement.js';

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
    // The waiver running longest wins, so the reported date is the one that matters.
    { orderBy: { expiresAt: 'desc' }, populate: ['finding'] },
  );
  const waivers = new Map<string, Waiver>();
  for (const w of active) if (!waivers.has(w.checkId)) waivers.set(w.checkId, w);
  if (waivers.size === 0) return { judgement, waivers };

  const checks = judgement.checks.map((c) => {
    const w = !c.pass ? waivers.get(c.id) : undefined;
    return w ? { ...c, details: { ...c.details, waived: { waiverId: w.id, until: w.expiresAt.toISOString() } } } : c;
  });
  const unwaived = failing.filter((c) => !waivers.has(c.id));
  if (unwaived.length > 0) return { judgement: { ...judgement, checks }, waivers };
  return {
    judgement: { ...judgement, checks, outcome: 'pass', reason: `passed with waiver: ${failing.map((c) => c.id).join(', ')}` },
    waivers,
  };
}

/**
 * Approved waivers past their date become `expired`: their finding (and any accepted
 * deviation of the same check that no other active waiver covers) is re-opened, the
 * transition is audited, and the finding's assignee — or the requester when nobody is
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
      waiver.state = 'expired';
      const reopened: Finding[] = [];
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
        finding.state = 'open';
        reopened.push(finding);
        audit(tx, waiver, 'finding.reopen', `finding:${finding.id}`, { from: 'accepted_deviation', to: 'open', waiverId: waiver.id });
      }
      audit(tx, waiver, 'waiver.expire', `waiver:${waiver.id}`, {
        from: 'approved',
        to: 'expired',
        comment: null,
        checkId: waiver.checkId,
        testCase: waiver.testCase.key,
        reopenedFindings: reopened.map((f) => f.id),
      });
      const recipient = waiver.finding?.assignee ?? waiver.requestedBy;
      if (!recipient.disabled) {
        const scope = `${waiver.testCase.key} / ${waiver.checkId}${waiver.target ? ` on ${waiver.target.key}` : ''}`;
        tx.create(Notification, {
          kind: 'waiver-expired',
          recipient: recipient.email,
          subject: `[Earmark] ${waiver.project.key}: waiver for ${scope} expired`,
          body: [
            `The waiver for ${scope} in ${waiver.project.name} ran until ${waiver.expiresAt.toISOString().slice(0, 10)} and has expired.`,
            `Reason it was granted: ${waiver.reason}`,
            '',
            reopened.length
              ? `${reopened.length === 1 ? 'Its finding is' : `${reopened.length} findings are`} open again: ${reopened.map((f) => f.title).join('; ')}`
              : 'No finding needed re-opening.',
            'From now on the check fails builds again until it is fixed or a new waiver is approved.',
            '',
            `You get this because you ${waiver.finding?.assignee ? 'are assigned the finding' : 'requested the waiver'} in Earmark.`,
          ].join('\n'),
          payload: { project: waiver.project.key, waiverId: waiver.id, findingIds: reopened.map((f) => f.id) },
        });
      }
    }
    await tx.flush();
    return due.length;
  });
}

function audit(em: EntityManager, waiver: Waiver, action: string, subject: string, details: Record<string, unknown>) {
  const event = new AuditEvent();
  event.actor = 'system:waiver-expiry';
  event.action = action;
  event.subject = subject;
  event.project = waiver.project;
  event.details = details;
  em.persist(event);
}
