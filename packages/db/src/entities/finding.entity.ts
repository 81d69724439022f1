import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Capture } from './capture.entity.js';
import { CheckResult } from './check-result.entity.js';
import { Project } from './project.entity.js';
import { User } from './user.entity.js';

export const findingStates = ['open', 'investigating', 'accepted_deviation', 'fixed', 'not_a_defect'] as const;
export type FindingState = (typeof findingStates)[number];

/** A failing check that needs a human. */
export class Finding extends BaseEntity<'checkResult' | 'state' | 'assignee' | 'commitLinks' | 'updatedAt'> {
  project!: Project;
  capture!: Capture;
  checkResult: CheckResult | null = null;
  checkId!: string;
  title!: string;
  state: FindingState = 'open';
  assignee: User | null = null;
  commitLinks: string[] = [];
  updatedAt: Date = new Date();
}

export const FindingSchema = new EntitySchema<Finding, BaseEntity>({
  class: Finding,
  properties: {
    ...baseProperties,
    project: { kind: 'm:1', entity: () => Project, deleteRule: 'cascade' },
    capture: { kind: 'm:1', entity: () => Capture, deleteRule: 'cascade' },
    checkResult: { kind: 'm:1', entity: () => CheckResult, nullable: true, deleteRule: 'set null' },
    checkId: { type: 'string', length: 80 },
    title: { type: 'string', length: 300 },
    state: { enum: true, items: () => [...findingStates], type: 'string', default: 'open', index: 'finding_state_idx' },
    assignee: { kind: 'm:1', entity: () => User, nullable: true },
    commitLinks: { type: 'json' },
    updatedAt: { type: 'datetime', onCreate: () => new Date(), onUpdate: () => new Date() },
  },
  indexes: [{ properties: ['project', 'state'] }],
});
