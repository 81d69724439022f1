import type { EntityManager } from '@mikro-orm/postgresql';
import { MaskCheck, MaskDocument, type CreateMaskRevisionRequest, type MaskRevisionDto } from '@earmark/contracts';
import { MaskRevision, Target, type MaskRevisionState, type Project, type TestCase, type User } from '@earmark/db';
import { ConflictError, ForbiddenError, NotFoundError, ValidationError } from '../errors.js';
import { parseWith } from '../validate.js';
import { recordAudit } from './audit.service.js';

/** Relations every revision answer needs. */
export const MASK_POPULATE = ['testCase', 'target', 'author', 'reviewer', 'basedOn'] as const;

export function toMaskRevisionDto(m: MaskRevision): MaskRevisionDto {
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
    createdAt: m.createdAt.toISOString(),
    decidedAt: m.decidedAt?.toISOString() ?? null,
    submittedAt: m.submittedAt?.toISOString() ?? null,
    decisionComment: m.decisionComment,
    basedOn: m.basedOn?.revision ?? null,
  };
}

/** The audit subject of a revision; its history is read back by this subject. */
export const maskSubject = (testCase: TestCase, revision: number) => `mask:${testCase.key}#${revision}`;

/** One audit event per state transition: who (actor), from, to and the comment. */
export function recordMaskTransition(
  em: EntityManager,
  project: Project,
  mask: MaskRevision,
  entry: { actor: User; action: string; from: MaskRevisionState | null; to: MaskRevisionState | null; comment?: string | null; details?: Record<string, unknown> },
): void {
  recordAudit(em, {
    actor: `user:${entry.actor.email}`,
    action: entry.action,
    subject: maskSubject(mask.testCase, mask.revision),
    project,
    details: { revision: mask.revision, target: mask.target?.key ?? null, from: entry.from, to: entry.to, comment: entry.comment ?? null, ...entry.details },
  });
}

/** Refuses a decision by the revision's own author (the four-eyes rule). */
export function assertNotAuthor(mask: MaskRevision, reviewer: User, verb: 'approved' | 'rejected'): void {
  if (mask.author.id === reviewer.id) {
    throw new ForbiddenError(`A mask revision must be ${verb} by someone other than its author (${mask.author.email} wrote revision ${mask.revision}).`);
  }
}

/**
 * Mask revisions: drafts by engineers, approval by QA managers (never their own).
 * The review workflow (submit, reject, copy, diff, history) is in MaskWorkflowService;
 * approving supersedes the revision in force.
 */
export class MaskService {
  list(em: EntityManager, testCase: TestCase) {
    return em.find(MaskRevision, { testCase }, { populate: MASK_POPULATE, orderBy: { revision: 'desc' } });
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
  ): Promise<MaskRevision> {
    const document = parseWith(MaskDocument, { checks: input.checks }, 'body');
    const target = await this.resolveTarget(em, project, input.target);
    const last = await em.findOne(MaskRevision, { testCase }, { orderBy: { revision: 'desc' } });
    const revision = em.create(MaskRevision, {
      testCase,
      target,
      revision: (last?.revision ?? 0) + 1,
      checks: document.checks,
      note: input.note,
      author,
      basedOn,
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
   * A QA manager may approve a revision in review, or a draft directly (that counts as
   * submitting it too). The revision in force for the same target becomes superseded.
   * @throws ForbiddenError for the author's own revision; ConflictError unless it is a draft or in review.
   */
  async approve(em: EntityManager, project: Project, testCase: TestCase, revision: number, reviewer: User, comment?: string): Promise<MaskRevision> {
    return em.transactional(async (tx) => {
      const mask = await this.get(tx, testCase, revision);
      assertNotAuthor(mask, reviewer, 'approved');
      if (mask.state !== 'draft' && mask.state !== 'in_review') throw new ConflictError(`Revision ${revision} is ${mask.state}; only drafts and revisions in review can be approved.`);
      const from = mask.state;
      const inForce = await tx.find(MaskRevision, { testCase, state: 'approved', target: mask.target ? mask.target.id : null }, { populate: ['testCase', 'target'] });
      for (const old of inForce) {
        old.state = 'superseded';
        recordMaskTransition(tx, project, old, { actor: reviewer, action: 'mask.supersede', from: 'approved', to: 'superseded', details: { supersededBy: mask.revision } });
      }
      await tx.flush(); // the partial unique index allows one approved revision at a time
      const now = new Date();
      mask.state = 'approved';
      mask.reviewer = reviewer;
      mask.decidedAt = now;
      mask.submittedAt ??= now;
      mask.decisionComment = comment ? comment : null;
      recordMaskTransition(tx, project, mask, {
        actor: reviewer,
        action: 'mask.approve',
        from,
        to: 'approved',
        comment: mask.decisionComment,
        details: { superseded: inForce.map((m) => m.revision) },
      });
      await tx.flush();
      return mask;
    });
  }
}
