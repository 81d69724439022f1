import { EntitySchema } from '@mikro-orm/core';
import type { BuildStatus } from '@earmark/contracts';
import { BaseEntity, baseProperties } from './base.js';
import { Project } from './project.entity.js';

export const buildStatuses = ['pending', 'running', 'pass', 'fail', 'error'] as const;

/** A firmware build: project + commit SHA; its status aggregates its captures' verdicts. */
export class Build extends BaseEntity<'label' | 'branch' | 'pipelineUrl' | 'status' | 'updatedAt'> {
  project!: Project;
  sha!: string;
  label: string | null = null;
  branch: string | null = null;
  pipelineUrl: string | null = null;
  status: BuildStatus = 'pending';
  updatedAt: Date = new Date();
}

export const BuildSchema = new EntitySchema<Build, BaseEntity>({
  class: Build,
  properties: {
    ...baseProperties,
    project: { kind: 'm:1', entity: () => Project, deleteRule: 'cascade' },
    sha: { type: 'string', length: 64 },
    label: { type: 'string', length: 120, nullable: true },
    branch: { type: 'string', length: 200, nullable: true },
    pipelineUrl: { type: 'text', nullable: true },
    status: { enum: true, items: () => [...buildStatuses], type: 'string', default: 'pending' },
    updatedAt: { type: 'datetime', onCreate: () => new Date(), onUpdate: () => new Date() },
  },
  uniques: [{ properties: ['project', 'sha'] }],
  // The builds table pages by project, newest first.
  indexes: [
    { name: 'build_project_created_at_idx', expression: 'create index "build_project_created_at_idx" on "build" ("project_id", "created_at" desc)' },
    // The builds table's filters: by branch and by status, newest first.
    { name: 'build_project_branch_created_at_idx', expression: 'create index "build_project_branch_created_at_idx" on "build" ("project_id", "branch", "created_at" desc)' },
    { name: 'build_project_status_created_at_idx', expression: 'create index "build_project_status_created_at_idx" on "build" ("project_id", "status", "created_at" desc)' },
  ],
});
