import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';

export const notificationStates = ['pending', 'sent', 'failed'] as const;
export type NotificationState = (typeof notificationStates)[number];

/** The mail outbox: written in the same transaction as its cause, sent later with retries. */
export class Notification extends BaseEntity<'html' | 'payload' | 'state' | 'attempts' | 'lastError' | 'sentAt' | 'nextAttemptAt'> {
  kind!: string;
  recipient!: string;
  subject!: string;
  /** The plain-text part. */
  body!: string;
  /** The HTML part (same content); null for mail written before it existed. */
  html: string | null = null;
  payload: Record<string, unknown> = {};
  state: NotificationState = 'pending';
  attempts = 0;
  lastError: string | null = null;
  sentAt: Date | null = null;
  /** When a refused message may be tried again (back-off); null: at once. */
  nextAttemptAt: Date | null = null;
}

export const NotificationSchema = new EntitySchema<Notification, BaseEntity>({
  class: Notification,
  properties: {
    ...baseProperties,
    kind: { type: 'string', length: 60 },
    recipient: { type: 'string', length: 254 },
    subject: { type: 'string', length: 300 },
    body: { type: 'text' },
    html: { type: 'text', nullable: true },
    payload: { type: 'json' },
    state: { enum: true, items: () => [...notificationStates], type: 'string', default: 'pending', index: 'notification_state_idx' },
    attempts: { type: 'integer', default: 0 },
    lastError: { type: 'text', nullable: true },
    sentAt: { type: 'datetime', nullable: true },
    nextAttemptAt: { type: 'datetime', nullable: true },
  },
});
