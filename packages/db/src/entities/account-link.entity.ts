import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { User } from './user.entity.js';

export const accountLinkPurposes = ['invite', 'reset'] as const;
export type AccountLinkPurpose = (typeof accountLinkPurposes)[number];

/**
 * A one-time link mailed to a person so they can set their password: after an invitation, or
 * after an administrator reset it. Only the SHA-256 of the link's secret is stored, so a leaked
 * table opens no account; the link works once and until `expiresAt`.
 */
export class AccountLink extends BaseEntity<'usedAt'> {
  user!: User;
  purpose!: AccountLinkPurpose;
  /** Hex SHA-256 of the secret in the link. */
  tokenHash!: string;
  expiresAt!: Date;
  usedAt: Date | null = null;
}

export const AccountLinkSchema = new EntitySchema<AccountLink, BaseEntity>({
  class: AccountLink,
  properties: {
    ...baseProperties,
    user: { kind: 'm:1', entity: () => User, deleteRule: 'cascade' },
    purpose: { enum: true, items: () => [...accountLinkPurposes], type: 'string' },
    tokenHash: { type: 'string', length: 64, unique: true },
    expiresAt: { type: 'datetime' },
    usedAt: { type: 'datetime', nullable: true },
  },
});
