import type { EntityManager } from '@mikro-orm/postgresql';
import { AuditEvent, type Project } from '@earmark/db';

export interface AuditEntry {
  actor: string;
  action: string;
  subject: string;
  project?: Project | null;
  details?: Record<string, unknown>;
}

/** Adds an audit event to the unit of work; it is written with the change it records. */
export function recordAudit(em: EntityManager, entry: AuditEntry): void {
  const event = new AuditEvent();
  event.actor = entry.actor;
  event.action = entry.action;
  event.subject = entry.subject;
  event.project = entry.project ?? null;
  event.details = entry.details ?? {};
  em.persist(event);
}
