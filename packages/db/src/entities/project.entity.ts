import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';

/** One firmware product line. */
export class Project extends BaseEntity<'description'> {
  key!: string;
  name!: string;
  description = '';
}

export const ProjectSchema = new EntitySchema<Project, BaseEntity>({
  class: Project,
  properties: {
    ...baseProperties,
    key: { type: 'string', length: 40, unique: true },
    name: { type: 'string', length: 120 },
    description: { type: 'text', default: '' },
  },
});
