import type { EntityManager } from '@mikro-orm/postgresql';
import { AuditEvent, type Project } from '@earmark/db';

export interface AuditEntry {
  /** `user:<email>`, `token:<prefix>` or `system:<job>`. */
  actor: string;
  action: string;
  /** `<kind>:<id or key>`, e.g. `mask:eq.music.sweep#3`. */
  subject: string;
  project?: Project | null;
  details?: Record<string, unknown>;
  /** The changed fields' values before and after, for edits (stored as `details.before` / `details.after`). */
  change?: { before: Record<string, unknown>; after: Record<string, unknown> };
}

/**
 * THE audit recorder: adds an audit event to the unit of work, so it is written (or rolled back)
 * with the change it records. Every edit passes `change` so the log says what changed, not only that something did.
 */
export function recordAudit(em: EntityManager, entry: AuditEntry): void {
  const event = new AuditEvent();
  event.actor = entry.actor;
  event.action = entry.action;
  event.subject = entry.subject;
  event.project = entry.project ?? null;
  event.details = { ...entry.details, ...(entry.change ? { changed: Object.keys(entry.change.after), before: entry.change.before, after: entry.change.after } : {}) };
  em.persist(event);
}

/**
 * The fields of `patch` whose value differs from `current`, as before/after maps (JSON
 * comparison, so nested settings compare by value). Fields the patch leaves undefined are unchanged.
 */
export function changedFields(current: Record<string, unknown>, patch: Record<string, unknown>): { before: Record<string, unknown>; after: Record<string, unknown> } {
  const before: Record<string, unknown> = {};
  const after: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(patch)) {
    if (value === undefined || JSON.stringify(current[key]) === JSON.stringify(value)) continue;
    before[key] = current[key] ?? null;
    after[key] = value;
  }
  return { before, after };
}
