import { formatDay, personName } from './mail-format.js';
import type { MailMessage } from './mail-message.js';
import { renderMail } from './render-mail.js';

export interface AccountLinkMailInput {
  purpose: 'invite' | 'reset';
  recipient: { displayName: string; email: string };
  sentBy: { displayName: string; email: string };
  /** The one-time page where the password is set. */
  link: string;
  expiresAt: Date;
}

/** To an invited person, or one whose password an administrator reset: the one-time link to set a password. */
export function composeAccountLinkMail(input: AccountLinkMailInput): MailMessage {
  const invite = input.purpose === 'invite';
  const hours = Math.round((input.expiresAt.getTime() - Date.now()) / 3_600_000);
  return renderMail({
    kind: invite ? 'account-invite' : 'password-reset',
    subject: invite ? '[Earmark] You are invited to Earmark' : '[Earmark] Set a new password',
    blocks: [
      {
        type: 'paragraph',
        content: [
          invite
            ? `${personName(input.sentBy)} invited you, ${input.recipient.displayName}, to Earmark, where firmware builds are judged against approved tolerance masks.`
            : `${personName(input.sentBy)} reset the password of your Earmark account (${input.recipient.email}).`,
        ],
      },
      { type: 'paragraph', content: [invite ? 'Choose your password here: ' : 'Choose a new password here: ', { href: input.link }] },
      {
        type: 'paragraph',
        content: [`The link works once and for ${hours} hours (until ${formatDay(input.expiresAt)}). If it has run out, ask an administrator for a new one.`],
      },
    ],
    footer: { reason: invite ? 'You get this because an Earmark administrator invited this address.' : 'You get this because an Earmark administrator reset your password.' },
    payload: { purpose: input.purpose, email: input.recipient.email },
  });
}
