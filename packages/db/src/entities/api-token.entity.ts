import { EntitySchema } from '@mikro-orm/core';
import type { TokenScope } from '@earmark/contracts';
import { BaseEntity, baseProperties } from './base.js';
import { Project } from './project.entity.js';
import { User } from './user.entity.js';

/**
 * A CI token scoped to one project. Only the SHA-256 of the secret is stored; the short
 * public prefix finds the row without scanning hashes.
 */
export class ApiToken extends BaseEntity<'scopes' | 'lastUsedAt' | 'revokedAt' | 'expiresAt'> {
  project!: Project;
  name!: string;
  prefix!: string;
  secretHash!: string;
  scopes: TokenScope[] = [];
  createdBy!: User;
  lastUsedAt: Date | null = null;
  revokedAt: Date | null = null;
  /** After this instant the token is refused (null: it never expires). */
  expiresAt: Date | null = null;
}

export const ApiTokenSchema = new EntitySchema<ApiToken, BaseEntity>({
  class: ApiToken,
  properties: {
    ...baseProperties,
    project: { kind: 'm:1', entity: () => Project, deleteRule: 'cascade' },
    name: { type: 'string', length: 80 },
    prefix: { type: 'string', length: 24, unique: true },
    secretHash: { type: 'string', length: 64, hidden: true },
    scopes: { type: 'json' },
    createdBy: { kind: 'm:1', entity: () => User },
    lastUsedAt: { type: 'datetime', nullable: true },
    revokedAt: { type: 'datetime', nullable: true },
    expiresAt: { type: 'datetime', nullable: true },
  },
});
