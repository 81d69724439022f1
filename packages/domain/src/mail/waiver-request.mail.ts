import { formatDay, personName } from './mail-format.js';
import type { MailMessage } from './mail-message.js';
import { renderMail } from './render-mail.js';

export interface WaiverRequestInput {
  project: { key: string; name: string };
  waiverId: string;
  findingId: string;
  findingTitle: string;
  testCase: string;
  checkId: string;
  /** The one target the waiver covers; null for every target. */
  target: string | null;
  until: Date;
  reason: string;
  requester: { displayName: string; email: string };
  approvalsPage: string;
}

/** To the project's QA managers: an engineer asks to accept a finding's deviation until a date. */
export function composeWaiverRequestMail(input: WaiverRequestInput): MailMessage {
  const { project } = input;
  return renderMail({
    kind: 'waiver-requested',
    subject: `[Earmark] ${project.key}: waiver requested for ${input.testCase} / ${input.checkId}`,
    blocks: [
      { type: 'paragraph', content: [`${personName(input.requester)} asks to accept a deviation in ${project.name} until ${formatDay(input.until)}.`] },
      {
        type: 'list',
        items: [
          { content: [`Scope: ${input.testCase} / ${input.checkId} on ${input.target ? `target ${input.target}` : 'every target'}`] },
          { content: [`Finding: ${input.findingTitle}`] },
        ],
      },
      { type: 'quote', label: 'Reason', text: input.reason },
      { type: 'paragraph', content: ['Decide: ', { href: input.approvalsPage }] },
    ],
    footer: { reason: `You get this because you are a QA manager of ${project.name} in Earmark.` },
    payload: { project: project.key, waiverId: input.waiverId, findingId: input.findingId },
  });
}
