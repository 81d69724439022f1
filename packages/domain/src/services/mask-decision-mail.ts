import type { EntityManager } from '@mikro-orm/postgresql';
import type { MaskRevision, Project } from '@earmark/db';
import { composeMaskDecisionMail } from '../mail/mask-decision.mail.js';
import { writeToOutbox } from '../mail/outbox.js';
import type { Links } from './links.js';

/**
 * The author hears that their revision was approved or rejected, with the reviewer's comment
 * (outbox, in the caller's unit of work). Call after the decision is set on the revision.
 * @returns the number of messages queued (0 for a disabled author)
 */
export function mailMaskDecision(em: EntityManager, project: Project, mask: MaskRevision, pages: Pick<Links, 'masksPage'>): number {
  if ((mask.state !== 'approved' && mask.state !== 'rejected') || !mask.reviewer) return 0;
  const message = composeMaskDecisionMail({
    project,
    testCase: mask.testCase.key,
    revision: mask.revision,
    target: mask.target?.key ?? null,
    decision: mask.state,
    reviewer: mask.reviewer,
    comment: mask.decisionComment,
    masksPage: pages.masksPage(project.key, mask.testCase.key),
  });
  return writeToOutbox(em, message, [mask.author]);
}
