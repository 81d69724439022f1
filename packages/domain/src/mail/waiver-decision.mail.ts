import { formatDay, personName } from './mail-format.js';
import type { MailMessage } from './mail-message.js';
import { renderMail } from './render-mail.js';

export interface WaiverDecisionInput {
  project: { key: string; name: string };
  waiverId: string;
  testCase: string;
  checkId: string;
  decision: 'approved' | 'rejected';
  until: Date;
  decider: { displayName: string; email: string };
  comment: string | null;
  findingsPage: string;
}

/** To the requester: a QA manager approved or rejected their waiver, with the comment. */
export function composeWaiverDecisionMail(input: WaiverDecisionInput): MailMessage {
  const { project, decision } = input;
  const scope = `${input.testCase} / ${input.checkId}`;
  return renderMail({
    kind: `waiver-${decision}`,
    subject: `[Earmark] ${project.key}: your waiver for ${scope} was ${decision}`,
    blocks: [
      {
        type: 'paragraph',
        content: [
          `${personName(input.decider)} ${decision} your waiver for ${scope} in ${project.name}` +
            (decision === 'approved' ? `; it runs until ${formatDay(input.until)} and the check counts as passed with waiver until then.` : '; the check keeps failing builds.'),
        ],
      },
      ...(input.comment ? [{ type: 'quote' as const, label: 'Comment', text: input.comment }] : []),
      { type: 'paragraph', content: ['Findings: ', { href: input.findingsPage }] },
    ],
    footer: { reason: 'You get this because you requested the waiver in Earmark.' },
    payload: { project: project.key, waiverId: input.waiverId, decision },
  });
}
