import { personName } from './mail-format.js';
import type { MailMessage } from './mail-message.js';
import { renderMail } from './render-mail.js';

export interface MaskReviewInput {
  project: { key: string; name: string };
  testCase: string;
  revision: number;
  /** The target the revision is for; null for all targets. */
  target: string | null;
  submittedBy: { displayName: string; email: string };
  author: { email: string };
  checkCount: number;
  basedOn: number | null;
  note: string;
  masksPage: string;
  approvalsPage: string;
}

/** To the project's QA managers: a mask revision was submitted and waits for their review. */
export function composeMaskReviewMail(input: MaskReviewInput): MailMessage {
  const { project, testCase, revision } = input;
  return renderMail({
    kind: 'mask-review',
    subject: `[Earmark] ${project.key}: mask ${testCase} revision ${revision} awaits review`,
    blocks: [
      {
        type: 'paragraph',
        content: [
          `${personName(input.submittedBy)} submitted revision ${revision} of the tolerance mask for ${testCase} (${input.target ? `target ${input.target}` : 'all targets'}) in ${project.name} for review.`,
        ],
      },
      { type: 'paragraph', content: [`Author: ${input.author.email}. Checks: ${input.checkCount}.${input.basedOn ? ` Copied from revision ${input.basedOn}.` : ''}`] },
      ...(input.note ? [{ type: 'quote' as const, label: 'Note', text: input.note }] : []),
      { type: 'paragraph', content: ['Review it: ', { href: input.masksPage }] },
      { type: 'paragraph', content: ['All reviews waiting: ', { href: input.approvalsPage }] },
    ],
    footer: { reason: `You get this because you are a QA manager of ${project.name} in Earmark.` },
    payload: { project: project.key, testCase, revision },
  });
}
