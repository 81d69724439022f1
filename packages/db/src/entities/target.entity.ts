import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Project } from './project.entity.js';

/** A hardware or configuration variant within a project (board rev, sample rate). */
export class Target extends BaseEntity<'description' | 'sampleRate'> {
  project!: Project;
  key!: string;
  name!: string;
  description = '';
  sampleRate: number | null = null;
}

export const TargetSchema = new EntitySchema<Target, BaseEntity>({
  class: Target,
  properties: {
    ...baseProperties,
    project: { kind: 'm:1', entity: () => Project, deleteRule: 'cascade' },
    key: { type: 'string', length: 60 },
    name: { type: 'string', length: 120 },
    description: { type: 'text', default: '' },
    sampleRate: { type: 'integer', nullable: true },
  },
  uniques: [{ properties: ['project', 'key'] }],
});
