import { personName } from './mail-format.js';
import type { MailMessage } from './mail-message.js';
import { renderMail } from './render-mail.js';

export interface MaskDecisionInput {
  project: { key: string; name: string };
  testCase: string;
  revision: number;
  target: string | null;
  decision: 'approved' | 'rejected';
  reviewer: { displayName: string; email: string };
  comment: string | null;
  masksPage: string;
}

/** To the revision's author: a QA manager approved or rejected it, with their comment. */
export function composeMaskDecisionMail(input: MaskDecisionInput): MailMessage {
  const { project, testCase, revision, decision } = input;
  const where = input.target ? `target ${input.target}` : 'all targets';
  const next =
    decision === 'approved'
      ? 'It is now the mask in force and judges new captures.'
      : 'A rejected revision does not change again; copy it to a new draft to address the comment.';
  return renderMail({
    kind: `mask-${decision}`,
    subject: `[Earmark] ${project.key}: mask ${testCase} revision ${revision} was ${decision}`,
    blocks: [
      { type: 'paragraph', content: [`${personName(input.reviewer)} ${decision} revision ${revision} of the tolerance mask for ${testCase} (${where}) in ${project.name}. ${next}`] },
      ...(input.comment ? [{ type: 'quote' as const, label: 'Comment', text: input.comment }] : []),
      { type: 'paragraph', content: ['Open the mask: ', { href: input.masksPage }] },
    ],
    footer: { reason: `You get this because you wrote revision ${revision} of this mask in Earmark.` },
    payload: { project: project.key, testCase, revision, decision },
  });
}
