import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Target } from './target.entity.js';
import { TestCase, type StoredJudgingSettings } from './test-case.entity.js';
import { User } from './user.entity.js';

export const maskRevisionStates = ['draft', 'in_review', 'approved', 'superseded', 'rejected'] as const;
export type MaskRevisionState = (typeof maskRevisionStates)[number];

/**
 * One revision of a test case's tolerance mask, optionally for one target only.
 * Exactly one approved revision is in force per (test case, target): a partial unique
 * index in the migration enforces it.
 */
export class MaskRevision extends BaseEntity<'target' | 'state' | 'checks' | 'note' | 'reviewer' | 'submittedAt' | 'decidedAt' | 'decisionComment' | 'basedOn' | 'derivation' | 'contributors'> {
  testCase!: TestCase;
  target: Target | null = null;
  revision!: number;
  state: MaskRevisionState = 'draft';
  checks: unknown[] = [];
  note = '';
  author!: User;
  reviewer: User | null = null;
  submittedAt: Date | null = null;
  decidedAt: Date | null = null;
  decisionComment: string | null = null;
  /** The revision this draft was copied from. */
  basedOn: MaskRevision | null = null;
  /** How the limits were derived from golden captures (captures, k, guard, segments), if they were. */
  derivation: Record<string, unknown> | null = null;
  /**
   * User ids of everyone who wrote or edited this revision, the author first: none of them
   * may approve or reject it (the four-eyes rule, packages/domain/src/rules/four-eyes.ts).
   */
  contributors: string[] = [];
  /**
   * Stimulus, analysis settings and channel map captures are judged with under this revision:
   * snapshotted from the test case (or the copied revision) when drafted, editable while a
   * draft, reviewed and approved with the checks.
   */
  settings!: StoredJudgingSettings;
}

export const MaskRevisionSchema = new EntitySchema<MaskRevision, BaseEntity>({
  class: MaskRevision,
  properties: {
    ...baseProperties,
    testCase: { kind: 'm:1', entity: () => TestCase, deleteRule: 'cascade' },
    target: { kind: 'm:1', entity: () => Target, nullable: true, deleteRule: 'cascade' },
    revision: { type: 'integer' },
    state: { enum: true, items: () => [...maskRevisionStates], type: 'string', default: 'draft' },
    checks: { type: 'json' },
    note: { type: 'text', default: '' },
    author: { kind: 'm:1', entity: () => User },
    reviewer: { kind: 'm:1', entity: () => User, nullable: true },
    submittedAt: { type: 'datetime', nullable: true },
    decidedAt: { type: 'datetime', nullable: true },
    decisionComment: { type: 'text', nullable: true },
    basedOn: { kind: 'm:1', entity: () => MaskRevision, nullable: true, deleteRule: 'set null' },
    derivation: { type: 'json', nullable: true },
    contributors: { type: 'json' },
    settings: { type: 'json' },
  },
  uniques: [{ properties: ['testCase', 'revision'] }],
  indexes: [
    {
      name: 'mask_revision_one_approved_idx',
      expression:
        'create unique index "mask_revision_one_approved_idx" on "mask_revision" ("test_case_id", coalesce("target_id", \'00000000-0000-0000-0000-000000000000\'::uuid)) where "state" = \'approved\'',
    },
  ],
});
