import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Finding } from './finding.entity.js';
import { Project } from './project.entity.js';
import { Target } from './target.entity.js';
import { TestCase } from './test-case.entity.js';
import { User } from './user.entity.js';

export const waiverStates = ['requested', 'approved', 'rejected', 'expired', 'revoked'] as const;
export type WaiverState = (typeof waiverStates)[number];

/** An accepted deviation of one check, approved by a QA manager, until it expires. */
export class Waiver extends BaseEntity<'target' | 'state' | 'approvedBy' | 'finding' | 'decisionComment' | 'decidedAt'> {
  project!: Project;
  testCase!: TestCase;
  target: Target | null = null;
  checkId!: string;
  reason!: string;
  expiresAt!: Date;
  state: WaiverState = 'requested';
  requestedBy!: User;
  approvedBy: User | null = null;
  /** The finding the waiver was requested for; re-opened when the waiver expires. */
  finding: Finding | null = null;
  decisionComment: string | null = null;
  decidedAt: Date | null = null;
}

export const WaiverSchema = new EntitySchema<Waiver, BaseEntity>({
  class: Waiver,
  properties: {
    ...baseProperties,
    project: { kind: 'm:1', entity: () => Project, deleteRule: 'cascade' },
    testCase: { kind: 'm:1', entity: () => TestCase, deleteRule: 'cascade' },
    target: { kind: 'm:1', entity: () => Target, nullable: true, deleteRule: 'cascade' },
    checkId: { type: 'string', length: 80 },
    reason: { type: 'text' },
    expiresAt: { type: 'datetime' },
    state: { enum: true, items: () => [...waiverStates], type: 'string', default: 'requested' },
    requestedBy: { kind: 'm:1', entity: () => User },
    approvedBy: { kind: 'm:1', entity: () => User, nullable: true },
    finding: { kind: 'm:1', entity: () => Finding, nullable: true, deleteRule: 'set null' },
    decisionComment: { type: 'text', nullable: true },
    decidedAt: { type: 'datetime', nullable: true },
  },
  indexes: [{ name: 'waiver_lookup_idx', properties: ['testCase', 'checkId', 'state'] }],
});
