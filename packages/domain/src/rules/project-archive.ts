import type { Project } from '@earmark/db';
import { ConflictError } from '../errors.js';

/**
 * An archived project keeps its history for reading but takes no new builds or captures, so a
 * forgotten pipeline cannot keep filling it.
 * @throws ConflictError (409, code `project-archived`)
 */
export function assertAcceptsUploads(project: Project): void {
  if (project.archivedAt) {
    throw new ConflictError(
      `Project ${project.key} was archived on ${project.archivedAt.toISOString().slice(0, 10)} and accepts no builds or captures; an administrator can restore it.`,
      { code: 'project-archived' },
    );
  }
}
