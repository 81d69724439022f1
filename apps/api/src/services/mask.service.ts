import type { EntityManager } from '@mikro-orm/postgresql';
import { MaskCheck, MaskDocument, type CreateMaskRevisionRequest, type MaskRevisionDto } from '@earmark/contracts';
import { MaskRevision, Target, type Project, type TestCase, type User } from '@earmark/db';
import { ConflictError, ForbiddenError, NotFoundError, ValidationError } from '../errors.js';
import { parseWith } from '../http/validate.js';
import { recordAudit } from './audit.service.js';

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
  };
}

/**
 * Mask revisions: drafts by engineers, approval by QA managers (never their own).
 * The full review workflow builds on this; approving supersedes the revision in force.
 */
export class MaskService {
  list(em: EntityManager, testCase: TestCase) {
    return em.find(MaskRevision, { testCase }, { populate: ['testCase', 'target', 'author', 'reviewer'], orderBy: { revision: 'desc' } });
  }

  async createDraft(em: EntityManager, project: Project, testCase: TestCase, input: CreateMaskRevisionRequest, author: User): Promise<MaskRevision> {
    const document = parseWith(MaskDocument, { checks: input.checks }, 'body');
    let target: Target | null = null;
    if (input.target) {
      target = await em.findOne(Target, { project, key: input.target });
      if (!target) throw new ValidationError(`Project ${project.key} has no target ${input.target}.`, [{ path: 'body.target', message: 'unknown target' }]);
    }
    const last = await em.findOne(MaskRevision, { testCase }, { orderBy: { revision: 'desc' } });
    const revision = em.create(MaskRevision, {
      testCase,
      target,
      revision: (last?.revision ?? 0) + 1,
      checks: document.checks,
      note: input.note,
      author,
    });
    recordAudit(em, { actor: `user:${author.email}`, action: 'mask.draft', subject: `mask:${testCase.key}#${revision.revision}`, project });
    await em.flush();
    return revision;
  }

  async get(em: EntityManager, testCase: TestCase, revision: number): Promise<MaskRevision> {
    const mask = await em.findOne(MaskRevision, { testCase, revision }, { populate: ['testCase', 'target', 'author', 'reviewer'] });
    if (!mask) throw new NotFoundError(`Test case ${testCase.key} has no mask revision ${revision}.`);
    return mask;
  }

  /** @throws ForbiddenError for the author's own revision; ConflictError unless it is a draft or in review. */
  async approve(em: EntityManager, project: Project, testCase: TestCase, revision: number, reviewer: User): Promise<MaskRevision> {
    return em.transactional(async (tx) => {
      const mask = await this.get(tx, testCase, revision);
      if (mask.author.id === reviewer.id) throw new ForbiddenError('A mask revision must be approved by someone other than its author.');
      if (mask.state !== 'draft' && mask.state !== 'in_review') throw new ConflictError(`Revision ${revision} is ${mask.state}; only drafts and revisions in review can be approved.`);
      const inForce = await tx.find(MaskRevision, { testCase, state: 'approved', target: mask.target ? mask.target.id : null });
      for (const old of inForce) old.state = 'superseded';
      await tx.flush(); // the partial unique index allows one approved revision at a time
      mask.state = 'approved';
      mask.reviewer = reviewer;
      mask.decidedAt = new Date();
      recordAudit(tx, { actor: `user:${reviewer.email}`, action: 'mask.approve', subject: `mask:${testCase.key}#${revision}`, project, details: { superseded: inForce.map((m) => m.revision) } });
      await tx.flush();
      return mask;
    });
  }
}
