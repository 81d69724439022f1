import { formatDay, personName } from './mail-format.js';
import type { MailMessage } from './mail-message.js';
import { renderMail } from './render-mail.js';

export interface WaiverRevokedInput {
  project: { key: string; name: string };
  waiverId: string;
  testCase: string;
  checkId: string;
  /** The one target the waiver covered, or null for every target. */
  target: string | null;
  /** The date it would have run until. */
  until: Date;
  revokedBy: { displayName: string; email: string };
  reason: string;
  findingsPage: string;
  /** Why this person: they asked for the waiver, or they are assigned its finding. */
  recipientIs: 'requester' | 'assignee';
}

/** To the requester (and the finding's assignee): a QA manager took an approved waiver back before its date. */
export function composeWaiverRevokedMail(input: WaiverRevokedInput): MailMessage {
  const { project } = input;
  const scope = `${input.testCase} / ${input.checkId}`;
  const targets = input.target ? `target ${input.target}` : 'every target';
  return renderMail({
    kind: 'waiver-revoked',
    subject: `[Earmark] ${project.key}: waiver for ${scope} on ${targets} revoked by ${input.revokedBy.displayName}`,
    blocks: [
      {
        type: 'paragraph',
        content: [
          `${personName(input.revokedBy)} revoked the waiver for ${scope} on ${targets} in ${project.name}, ` +
            `which was to run until ${formatDay(input.until)}.`,
        ],
      },
      { type: 'quote', label: 'Reason', text: input.reason },
      {
        type: 'paragraph',
        content: ['From now on the check fails builds again: the captures it covered were judged again at once and count it as a failure.'],
      },
      { type: 'paragraph', content: ['Findings: ', { href: input.findingsPage }] },
    ],
    footer: { reason: `You get this because you ${input.recipientIs === 'assignee' ? 'are assigned the finding' : 'requested the waiver'} in Earmark.` },
    payload: { project: project.key, waiverId: input.waiverId, revokedBy: input.revokedBy.email },
  });
}
