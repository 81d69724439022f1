import type { EntityManager } from '@mikro-orm/postgresql';
import { JudgingSettings, MaskCheck, MaskDocument, type CreateMaskRevisionRequest, type MaskRevisionDto } from '@earmark/contracts';
import { MaskRevision, Target, User, testCaseSettings, type MaskRevisionState, type Project, type StoredJudgingSettings, type TestCase } from '@earmark/db';
import { ConflictError, NotFoundError, ValidationError } from '../errors.js';
import { assertMayDecide, contributorsOf, maskUnderReview } from '../rules/four-eyes.js';
import { parseWith } from '../validate.js';
import { assertAcceptanceChecks } from '../rules/acceptance-checks.js';
import { changedFields, recordAudit, type AuditEntry } from './audit.service.js';
import type { Links } from './links.js';
import { mailMaskDecision } from './mask-decision-mail.js';
import { normalizedSettings } from '../judging/judging-settings.js';
import { MASK_REVISION, moveTo } from '../rules/state-machines.js';

/** Relations every revision answer needs. */
export const MASK_POPULATE = ['testCase', 'target', 'author', 'reviewer', 'basedOn'] as const;

/**
 * The answer for one revision. `emails` maps user ids to e-mail addresses for its contributors
 * (MaskService.present loads them).
 */
export function toMaskRevisionDto(m: MaskRevision, emails: ReadonlyMap<string, string>): MaskRevisionDto {
  return {
    id: m.id,
    testCase: m.testCase.key,
    target: m.target?.key ?? null,
    revision: m.revision,
    state: m.state,
    checks: m.checks.map((c) => MaskCheck.parse(c)),
    note: m.note,
    author: m.author.email,
    reviewer: m.reviewer?.email ?? null,
    contributors: contributorsOf(m).map((id) => emails.get(id) ?? id),
    createdAt: m.createdAt.toISOString(),
    decidedAt: m.decidedAt?.toISOString() ?? null,
    submittedAt: m.submittedAt?.toISOString() ?? null,
    decisionComment: m.decisionComment,
    basedOn: m.basedOn?.revision ?? null,
    settings: JudgingSettings.parse(m.settings),
  };
}

/** The audit subject of a revision; its history is read back by this subject. */
export const maskSubject = (testCase: TestCase, revision: number) => `mask:${testCase.key}#${revision}`;

/** One audit event per state transition or edit: who (actor), from, to, the comment and, for an edit, the changed values. */
export function recordMaskTransition(
  em: EntityManager,
  project: Project,
  mask: MaskRevision,
  entry: {
    actor: User;
    action: string;
    from: MaskRevisionState | null;
    to: MaskRevisionState | null;
    comment?: string | null;
    details?: Record<string, unknown>;
    change?: AuditEntry['change'];
  },
): void {
  recordAudit(em, {
    actor: `user:${entry.actor.email}`,
    action: entry.action,
    subject: maskSubject(mask.testCase, mask.revision),
    project,
    details: { revision: mask.revision, target: mask.target?.key ?? null, from: entry.from, to: entry.to, comment: entry.comment ?? null, ...entry.details },
    ...(entry.change ? { change: entry.change } : {}),
  });
}

/**
 * An approved all-targets revision's settings become the test case's own, so the stimulus
 * served to rigs, the catalog and new drafts follow what now judges. Audited as a test-case
 * change with the values before and after.
 */
function adoptApprovedSettings(em: EntityManager, project: Project, mask: MaskRevision, reviewer: User): void {
  const testCase = mask.testCase;
  const change = changedFields({ ...normalizedSettings(testCaseSettings(testCase)) }, { ...normalizedSettings(mask.settings) });
  if (Object.keys(change.after).length === 0) return;
  em.assign(testCase, structuredClone(change.after));
  recordAudit(em, {
    actor: `user:${reviewer.email}`,
    action: 'test-case.update',
    subject: `test-case:${testCase.key}`,
    project,
    details: { via: maskSubject(testCase, mask.revision) },
    change,
  });
}

/**
 * Mask revisions: drafts by engineers, approval by QA managers (never their own).
 * The review workflow (submit, reject, copy, diff, history) is in MaskWorkflowService;
 * approving supersedes the revision in force.
 */
export class MaskService {
  constructor(private readonly pages: Pick<Links, 'masksPage'>) {}

  list(em: EntityManager, testCase: TestCase) {
    return em.find(MaskRevision, { testCase }, { populate: MASK_POPULATE, orderBy: { revision: 'desc' } });
  }

  /** The answers for these revisions, with their contributors' e-mail addresses (one query). */
  async present(em: EntityManager, masks: readonly MaskRevision[]): Promise<MaskRevisionDto[]> {
    const ids = [...new Set(masks.flatMap((m) => contributorsOf(m)))];
    const users = ids.length ? await em.find(User, { id: { $in: ids } }) : [];
    const emails = new Map(users.map((u) => [u.id, u.email]));
    return masks.map((m) => toMaskRevisionDto(m, emails));
  }

  async presentOne(em: EntityManager, mask: MaskRevision): Promise<MaskRevisionDto> {
    const [dto] = await this.present(em, [mask]);
    return dto!;
  }

  async resolveTarget(em: EntityManager, project: Project, key: string | null): Promise<Target | null> {
    if (!key) return null;
    const target = await em.findOne(Target, { project, key });
    if (!target) throw new ValidationError(`Project ${project.key} has no target ${key}.`, [{ path: 'body.target', message: 'unknown target' }]);
    return target;
  }

  async createDraft(
    em: EntityManager,
    project: Project,
    testCase: TestCase,
    input: CreateMaskRevisionRequest,
    author: User,
    basedOn: MaskRevision | null = null,
    // A draft judges with the settings it started from (the copied revision's, else the test case's) until edited.
    settings: StoredJudgingSettings = testCaseSettings(testCase),
  ): Promise<MaskRevision> {
    const document = parseWith(MaskDocument, { checks: input.checks }, 'body');
    assertAcceptanceChecks(document.checks);
    const target = await this.resolveTarget(em, project, input.target);
    const last = await em.findOne(MaskRevision, { testCase }, { orderBy: { revision: 'desc' } });
    const revision = em.create(MaskRevision, {
      testCase,
      target,
      revision: (last?.revision ?? 0) + 1,
      checks: document.checks,
      note: input.note,
      author,
      contributors: [author.id],
      basedOn,
      settings: structuredClone(settings),
    });
    recordMaskTransition(em, project, revision, {
      actor: author,
      action: basedOn ? 'mask.copy' : 'mask.draft',
      from: null,
      to: 'draft',
      details: basedOn ? { basedOn: basedOn.revision } : {},
    });
    await em.flush();
    return revision;
  }

  async get(em: EntityManager, testCase: TestCase, revision: number): Promise<MaskRevision> {
    const mask = await em.findOne(MaskRevision, { testCase, revision }, { populate: MASK_POPULATE });
    if (!mask) throw new NotFoundError(`Test case ${testCase.key} has no mask revision ${revision}.`);
    return mask;
  }

  /**
   * A QA manager approves a revision in review that they neither wrote nor edited (the
   * four-eyes rule); the revision in force for the same target becomes superseded. A draft
   * is not approved directly: that would submit it on its author's behalf.
   * @throws ForbiddenError for a contributor; ConflictError unless it is in review.
   */
  async approve(em: EntityManager, project: Project, testCase: TestCase, revision: number, reviewer: User, comment?: string): Promise<MaskRevision> {
    return em.transactional(async (tx) => {
      const mask = await this.get(tx, testCase, revision);
      assertMayDecide(maskUnderReview(mask), reviewer, 'approved');
      if (mask.state === 'draft') throw new ConflictError(`Revision ${revision} is a draft; its author must submit it for review before it can be approved.`);
      if (mask.state !== 'in_review') throw new ConflictError(`Revision ${revision} is ${mask.state}; only revisions in review can be approved.`);
      const from = mask.state;
      const inForce = await tx.find(MaskRevision, { testCase, state: 'approved', target: mask.target ? mask.target.id : null }, { populate: ['testCase', 'target'] });
      for (const old of inForce) {
        moveTo(MASK_REVISION, old, 'superseded', 'gate');
        recordMaskTransition(tx, project, old, { actor: reviewer, action: 'mask.supersede', from: 'approved', to: 'superseded', details: { supersededBy: mask.revision } });
      }
      await tx.flush(); // the partial unique index allows one approved revision at a time
      const now = new Date();
      moveTo(MASK_REVISION, mask, 'approved', 'person');
      mask.reviewer = reviewer;
      mask.decidedAt = now;
      mask.submittedAt ??= now;
      mask.decisionComment = comment ? comment : null;
      if (!mask.target) adoptApprovedSettings(tx, project, mask, reviewer);
      recordMaskTransition(tx, project, mask, {
        actor: reviewer,
        action: 'mask.approve',
        from,
        to: 'approved',
        comment: mask.decisionComment,
        details: { superseded: inForce.map((m) => m.revision) },
      });
      mailMaskDecision(tx, project, mask, this.pages);
      await tx.flush();
      return mask;
    });
  }
}
