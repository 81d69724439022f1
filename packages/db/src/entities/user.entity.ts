import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';

export class User extends BaseEntity<'isAdmin' | 'disabled' | 'tokenVersion' | 'lastLoginAt' | 'awaitingPassword'> {
  email!: string;
  displayName!: string;
  passwordHash!: string;
  isAdmin = false;
  disabled = false;
  /** Bumped on sign-out and password change; refresh tokens carry it, so old ones die. */
  tokenVersion = 0;
  lastLoginAt: Date | null = null;
  /** Invited but has not set a password through the invitation link yet: cannot sign in. */
  awaitingPassword = false;
}

export const UserSchema = new EntitySchema<User, BaseEntity>({
  class: User,
  tableName: 'app_user',
  properties: {
    ...baseProperties,
    email: { type: 'string', length: 254, unique: true },
    displayName: { type: 'string', length: 120 },
    passwordHash: { type: 'string', length: 100, hidden: true },
    isAdmin: { type: 'boolean', default: false },
    disabled: { type: 'boolean', default: false },
    tokenVersion: { type: 'integer', default: 0 },
    lastLoginAt: { type: 'datetime', nullable: true },
    awaitingPassword: { type: 'boolean', default: false },
  },
});
