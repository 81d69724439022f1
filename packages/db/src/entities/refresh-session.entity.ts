import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { User } from './user.entity.js';

/**
 * One refresh-token family: the chain of refresh tokens that started at one sign-in. The id is
 * the family id carried by every token of the chain; only the token whose jti is `currentJti`
 * may be exchanged. Presenting an older one is reuse (a stolen token), and revokes the family.
 */
export class RefreshSession extends BaseEntity<'revokedAt'> {
  user!: User;
  currentJti!: string;
  expiresAt!: Date;
  revokedAt: Date | null = null;
}

export const RefreshSessionSchema = new EntitySchema<RefreshSession, BaseEntity>({
  class: RefreshSession,
  properties: {
    ...baseProperties,
    user: { kind: 'm:1', entity: () => User, deleteRule: 'cascade' },
    currentJti: { type: 'uuid' },
    expiresAt: { type: 'datetime' },
    revokedAt: { type: 'datetime', nullable: true },
  },
});
