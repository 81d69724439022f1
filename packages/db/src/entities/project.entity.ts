import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';

/** One firmware product line. */
export class Project extends BaseEntity<'description' | 'driftThresholdDb' | 'driftWindow'> {
  key!: string;
  name!: string;
  description = '';
  /** A passing check whose margin shrank by more than this over the drift window is flagged. */
  driftThresholdDb = 1;
  /** Builds on a branch that the drift of a check is measured over. */
  driftWindow = 10;
}

export const ProjectSchema = new EntitySchema<Project, BaseEntity>({
  class: Project,
  properties: {
    ...baseProperties,
    key: { type: 'string', length: 40, unique: true },
    name: { type: 'string', length: 120 },
    description: { type: 'text', default: '' },
    driftThresholdDb: { type: 'double', default: 1 },
    driftWindow: { type: 'integer', default: 10 },
  },
});
