import type { EntityManager } from '@mikro-orm/postgresql';
import { Notification } from '@earmark/db';
import type { MailMessage } from './mail-message.js';

/** Who a message goes to: enough of a User to address it and to skip a disabled account. */
export interface MailRecipient {
  email: string;
  disabled: boolean;
}

/**
 * Writes one outbox row per recipient in the caller's unit of work, so the mail commits (or
 * not) with the change it announces; the worker sends it later with retries. Disabled users
 * are skipped and an address appears once.
 * @returns the number of rows written
 */
export function writeToOutbox(em: EntityManager, message: MailMessage, recipients: readonly MailRecipient[]): number {
  const seen = new Set<string>();
  for (const r of recipients) {
    const address = r.email.toLowerCase();
    if (r.disabled || seen.has(address)) continue;
    seen.add(address);
    em.create(Notification, {
      kind: message.kind,
      recipient: r.email,
      // The column holds 300 characters; a subject that long is cut rather than refused.
      subject: message.subject.length > 300 ? `${message.subject.slice(0, 299)}…` : message.subject,
      body: message.text,
      html: message.html,
      payload: message.payload,
    });
  }
  return seen.size;
}
