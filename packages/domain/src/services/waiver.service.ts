import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import type { RequestWaiverRequest, WaiverDto, WaiverListQuery } from '@earmark/contracts';
import { Finding, Waiver, type Project, type User, type WaiverState } from '@earmark/db';
import { ConflictError, NotFoundError, ValidationError } from '../errors.js';
import { recordAudit } from './audit.service.js';
import { rejudgeWaiverScope } from '../judging/rejudge-waivers.js';
import { endWaiver } from '../judging/waivers.js';
import { assertMayDecide, waiverUnderReview } from '../rules/four-eyes.js';
import { composeWaiverDecisionMail } from '../mail/waiver-decision.mail.js';
import { composeWaiverRequestMail } from '../mail/waiver-request.mail.js';
import { composeWaiverRevokedMail } from '../mail/waiver-revoked.mail.js';
import { writeToOutbox } from '../mail/outbox.js';
import { formatDay } from '../mail/mail-format.js';
import { qaManagersOf } from '../mail/recipients.js';
import type { Links } from './links.js';
import { FINDING, WAIVER, moveTo } from '../rules/state-machines.js';

const POPULATE = ['project', 'testCase', 'target', 'requestedBy', 'approvedBy', 'finding'] as const;

export const isActive = (w: Waiver, now = new Date()) => w.state === 'approved' && w.expiresAt > now;

export function toWaiverDto(w: Waiver): WaiverDto {
  return {
    id: w.id,
    project: w.project.key,
    testCase: w.testCase.key,
    target: w.target?.key ?? null,
    checkId: w.checkId,
    reason: w.reason,
    until: w.expiresAt.toISOString(),
    state: w.state,
    active: isActive(w),
    requestedBy: w.requestedBy.email,
    decidedBy: w.approvedBy?.email ?? null,
    decidedAt: w.decidedAt?.toISOString() ?? null,
    decisionComment: w.decisionComment,
    findingId: w.finding?.id ?? null,
    createdAt: w.createdAt.toISOString(),
  };
}

/** A bare date means the end of that day in UTC, so "until 2027-03-31" covers the 31st. */
export function parseUntil(until: string): Date {
  return /^\d{4}-\d{2}-\d{2}$/.test(until) ? new Date(`${until}T23:59:59.999Z`) : new Date(until);
}

/**
 * Waivers: an engineer asks to accept a finding's deviation until a date; a QA manager
 * other than the requester decides. While a waiver is active its check counts as passed
 * with waiver and the finding stays an accepted deviation: approving re-judges the captures
 * it governs at once, and so do a revocation and the sweeper's expiry, which also re-open the
 * finding (expiry mails its assignee).
 */
/** A second request, refused in words: which waiver exists, who asked, until when (no ids; the client links to it). */
export function existingWaiverDetail(checkId: string, waiver: Pick<Waiver, 'state' | 'createdAt' | 'expiresAt'> & { requestedBy: { email: string } }): string {
  const standing = waiver.state === 'requested' ? 'a waiver awaiting a QA manager’s decision' : 'a waiver in force';
  return `The ${checkId} check of this finding already has ${standing}: requested by ${waiver.requestedBy.email} on ${formatDay(waiver.createdAt)}, to run until ${formatDay(waiver.expiresAt)}. Follow that one instead of requesting another.`;
}

export class WaiverService {
  constructor(private readonly pages: Links) {}

  async list(em: EntityManager, project: Project, q: WaiverListQuery): Promise<Waiver[]> {
    const state = q.state === 'active' ? { state: 'approved' as const, expiresAt: { $gt: new Date() } } : q.state ? { state: q.state } : {};
    return em.find(Waiver, { project, ...state }, { populate: POPULATE, orderBy: { createdAt: 'desc' }, limit: 500 });
  }

  async get(em: EntityManager, project: Project, id: string): Promise<Waiver> {
    const waiver = /^[0-9a-f-]{36}$/i.test(id) ? await em.findOne(Waiver, { id, project }, { populate: POPULATE }) : null;
    if (!waiver) throw new NotFoundError(`Project ${project.key} has no waiver ${id}.`);
    return waiver;
  }

  /**
   * Scope: the finding's check on its test case, on every target or (targetOnly) its own.
   * @throws ValidationError for a date not in the future; ConflictError when the finding already has a pending or active waiver.
   */
  async request(em: EntityManager, project: Project, findingId: string, input: RequestWaiverRequest, requester: User): Promise<{ waiver: Waiver; mailed: number }> {
    return em.transactional(async (tx) => {
      const finding = /^[0-9a-f-]{36}$/i.test(findingId)
        ? await tx.findOne(Finding, { id: findingId, project }, { populate: ['capture.testCase', 'capture.target'] })
        : null;
      if (!finding) throw new NotFoundError(`Project ${project.key} has no finding ${findingId}.`);
      const until = parseUntil(input.until);
      if (!(until.getTime() > Date.now())) throw new ValidationError('A waiver must run until a date in the future.', [{ path: 'body.until', message: 'must be in the future' }]);
      if (finding.state === 'fixed' || finding.state === 'not_a_defect') throw new ConflictError(`Finding ${finding.id} is ${finding.state.replaceAll('_', ' ')}; there is nothing to waive.`);
      const pending = await tx.findOne(Waiver, { finding, $or: [{ state: 'requested' }, { state: 'approved', expiresAt: { $gt: new Date() } }] }, { populate: ['requestedBy'] });
      if (pending) throw new ConflictError(existingWaiverDetail(finding.checkId, pending), { code: 'waiver-exists', existing: { kind: 'waiver', id: pending.id, state: pending.state } });
      const { testCase, target } = finding.capture;
      const waiver = tx.create(Waiver, {
        project,
        testCase,
        target: input.targetOnly ? target : null,
        checkId: finding.checkId,
        reason: input.reason,
        expiresAt: until,
        requestedBy: requester,
        finding,
      });
      recordWaiverTransition(tx, project, waiver, requester, 'waiver.request', null, 'requested', null, { findingId: finding.id, checkId: finding.checkId, until: until.toISOString() });
      const request = composeWaiverRequestMail({
        project,
        waiverId: waiver.id,
        findingId: finding.id,
        findingTitle: finding.title,
        testCase: testCase.key,
        checkId: finding.checkId,
        target: input.targetOnly ? target.key : null,
        until,
        reason: input.reason,
        requester,
        approvalsPage: this.pages.approvalsPage(project.key),
      });
      const mailed = writeToOutbox(tx, request, await qaManagersOf(tx, project, [requester]));
      await tx.flush();
      return { waiver: await tx.findOneOrFail(Waiver, { id: waiver.id }, { populate: POPULATE }), mailed };
    });
  }

  /**
   * Requested → approved; the finding becomes an accepted deviation while the waiver runs.
   * @throws ForbiddenError for the requester (the four-eyes rule); ConflictError unless requested and still in the future.
   */
  async approve(em: EntityManager, project: Project, id: string, decider: User, comment: string | undefined): Promise<Waiver> {
    return em.transactional(async (tx) => {
      const waiver = await this.get(tx, project, id);
      assertMayDecide(waiverUnderReview(waiver), decider, 'approved');
      if (waiver.state !== 'requested') throw new ConflictError(`Waiver ${id} is ${waiver.state}; only requested waivers can be approved.`);
      if (waiver.expiresAt <= new Date()) throw new ConflictError(`Waiver ${id} ran until ${waiver.expiresAt.toISOString()}, which has passed; ask for a new one.`);
      this.decide(waiver, 'approved', decider, comment ?? null);
      const finding = waiver.finding;
      let findingFrom: string | null = null;
      if (finding && (finding.state === 'open' || finding.state === 'investigating')) {
        findingFrom = finding.state;
        moveTo(FINDING, finding, 'accepted_deviation', 'gate');
        recordAudit(tx, { actor: `user:${decider.email}`, action: 'finding.waive', subject: `finding:${finding.id}`, project, details: { from: findingFrom, to: 'accepted_deviation', waiverId: waiver.id } });
      }
      // At once, in this transaction: the captures the waiver governs pass with waiver where it is all they failed.
      const rejudged = await rejudgeWaiverScope(tx, waiver, { kind: 'approved', waiverId: waiver.id }, `user:${decider.email}`);
      recordWaiverTransition(tx, project, waiver, decider, 'waiver.approve', 'requested', 'approved', waiver.decisionComment, {
        findingState: finding ? { from: findingFrom, to: finding.state } : null,
        rejudgedCaptures: rejudged.captures,
      });
      this.mailRequester(tx, project, waiver, decider);
      await tx.flush();
      return waiver;
    });
  }

  /** Requested → rejected, with the reason. @throws ForbiddenError for the requester; ConflictError unless requested. */
  async reject(em: EntityManager, project: Project, id: string, decider: User, comment: string): Promise<Waiver> {
    const waiver = await this.get(em, project, id);
    assertMayDecide(waiverUnderReview(waiver), decider, 'rejected');
    if (waiver.state !== 'requested') throw new ConflictError(`Waiver ${id} is ${waiver.state}; only requested waivers can be rejected.`);
    this.decide(waiver, 'rejected', decider, comment);
    recordWaiverTransition(em, project, waiver, decider, 'waiver.reject', 'requested', 'rejected', comment, {});
    this.mailRequester(em, project, waiver, decider);
    await em.flush();
    return waiver;
  }

  /**
   * Approved → revoked, with the reason, before its date: the accepted deviations it covered
   * open again and the captures it governed are judged again at once (failing again unless
   * another waiver covers them). Taking an exception back needs no second person. The requester
   * and the finding's assignee are mailed (outbox, same transaction).
   * @throws ConflictError unless approved and still running
   */
  async revoke(em: EntityManager, project: Project, id: string, actor: User, reason: string): Promise<{ waiver: Waiver; mailed: number }> {
    return em.transactional(async (tx) => {
      const found = await this.get(tx, project, id);
      // The row lock makes two revocations (or a revocation and the expiry sweep) take turns.
      const waiver = await tx.findOneOrFail(Waiver, { id: found.id }, { lockMode: LockMode.PESSIMISTIC_WRITE, refresh: true, populate: POPULATE });
      if (waiver.state !== 'approved') throw new ConflictError(`Waiver ${id} is ${waiver.state}; only approved waivers can be revoked.`);
      if (waiver.expiresAt <= new Date()) throw new ConflictError(`Waiver ${id} ran until ${waiver.expiresAt.toISOString()} and is expiring already.`);
      moveTo(WAIVER, waiver, 'revoked', 'person');
      const { reopened, rejudged } = await endWaiver(tx, waiver, { kind: 'revoked', waiverId: waiver.id }, `user:${actor.email}`);
      recordWaiverTransition(tx, project, waiver, actor, 'waiver.revoke', 'approved', 'revoked', reason, {
        reopenedFindings: reopened.map((f) => f.id),
        rejudgedCaptures: rejudged.captures,
      });
      const mailed = await this.mailRevocation(tx, project, waiver, actor, reason);
      await tx.flush();
      return { waiver, mailed };
    });
  }

  private decide(waiver: Waiver, state: WaiverState, decider: User, comment: string | null) {
    moveTo(WAIVER, waiver, state, 'person');
    waiver.approvedBy = decider;
    waiver.decidedAt = new Date();
    waiver.decisionComment = comment ? comment : null;
  }

  /** The requester, and the finding's assignee when someone else, hear that the check fails builds again. */
  private async mailRevocation(em: EntityManager, project: Project, waiver: Waiver, actor: User, reason: string): Promise<number> {
    const assignee = waiver.finding ? (await em.populate(waiver.finding, ['assignee'])).assignee : null;
    const recipients: { user: User; recipientIs: 'requester' | 'assignee' }[] = [{ user: waiver.requestedBy, recipientIs: 'requester' }];
    if (assignee && assignee.id !== waiver.requestedBy.id) recipients.push({ user: assignee, recipientIs: 'assignee' });
    let mailed = 0;
    for (const { user, recipientIs } of recipients) {
      const mail = composeWaiverRevokedMail({
        project,
        waiverId: waiver.id,
        testCase: waiver.testCase.key,
        checkId: waiver.checkId,
        target: waiver.target?.key ?? null,
        until: waiver.expiresAt,
        revokedBy: actor,
        reason,
        findingsPage: this.pages.findingsPage(project.key),
        recipientIs,
      });
      mailed += writeToOutbox(em, mail, [user]);
    }
    return mailed;
  }

  /** The requester hears the decision (outbox, same transaction). */
  private mailRequester(em: EntityManager, project: Project, waiver: Waiver, decider: User) {
    if (waiver.state !== 'approved' && waiver.state !== 'rejected') return;
    const decision = composeWaiverDecisionMail({
      project,
      waiverId: waiver.id,
      testCase: waiver.testCase.key,
      checkId: waiver.checkId,
      decision: waiver.state,
      until: waiver.expiresAt,
      decider,
      comment: waiver.decisionComment,
      findingsPage: this.pages.findingsPage(project.key),
    });
    writeToOutbox(em, decision, [waiver.requestedBy]);
  }
}

function recordWaiverTransition(
  em: EntityManager,
  project: Project,
  waiver: Waiver,
  actor: User,
  action: string,
  from: WaiverState | null,
  to: WaiverState,
  comment: string | null,
  details: Record<string, unknown>,
) {
  recordAudit(em, { actor: `user:${actor.email}`, action, subject: `waiver:${waiver.id}`, project, details: { from, to, comment, checkId: waiver.checkId, testCase: waiver.testCase.key, ...details } });
}
