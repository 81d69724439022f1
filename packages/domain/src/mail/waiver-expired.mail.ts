import { formatDay } from './mail-format.js';
import type { MailMessage } from './mail-message.js';
import { renderMail } from './render-mail.js';

export interface WaiverExpiredInput {
  project: { key: string; name: string };
  waiverId: string;
  testCase: string;
  checkId: string;
  target: string | null;
  expiredAt: Date;
  reason: string;
  reopened: { id: string; title: string }[];
  /** Why this person: the finding's assignee, else the requester. */
  recipientIs: 'assignee' | 'requester';
}

/** To the finding's assignee (or the requester): a waiver ran out and its findings are open again. */
export function composeWaiverExpiredMail(input: WaiverExpiredInput): MailMessage {
  const { project, reopened } = input;
  const scope = `${input.testCase} / ${input.checkId}${input.target ? ` on ${input.target}` : ''}`;
  return renderMail({
    kind: 'waiver-expired',
    subject: `[Earmark] ${project.key}: waiver for ${scope} expired`,
    blocks: [
      { type: 'paragraph', content: [`The waiver for ${scope} in ${project.name} ran until ${formatDay(input.expiredAt)} and has expired.`] },
      { type: 'quote', label: 'Reason it was granted', text: input.reason },
      reopened.length
        ? { type: 'list', title: reopened.length === 1 ? 'Its finding is open again' : `${reopened.length} findings are open again`, items: reopened.map((f) => ({ content: [f.title] })) }
        : { type: 'paragraph', content: ['No finding needed re-opening.'] },
      { type: 'paragraph', content: ['From now on the check fails builds again until it is fixed or a new waiver is approved.'] },
    ],
    footer: { reason: `You get this because you ${input.recipientIs === 'assignee' ? 'are assigned the finding' : 'requested the waiver'} in Earmark.` },
    payload: { project: project.key, waiverId: input.waiverId, findingIds: reopened.map((f) => f.id) },
  });
}
