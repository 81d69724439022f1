import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Project } from './project.entity.js';

/** An append-only record of who did what; actors are `user:<email>` or `token:<prefix>`. */
export class AuditEvent extends BaseEntity<'project' | 'details'> {
  actor!: string;
  action!: string;
  subject!: string;
  project: Project | null = null;
  details: Record<string, unknown> = {};
}

export const AuditEventSchema = new EntitySchema<AuditEvent, BaseEntity>({
  class: AuditEvent,
  properties: {
    ...baseProperties,
    actor: { type: 'string', length: 300 },
    action: { type: 'string', length: 80 },
    subject: { type: 'string', length: 300 },
    project: { kind: 'm:1', entity: () => Project, nullable: true, deleteRule: 'set null' },
    details: { type: 'json' },
  },
  indexes: [{ name: 'audit_event_created_at_idx', expression: 'create index "audit_event_created_at_idx" on "audit_event" ("created_at" desc)' }],
});
