import type { EntityManager } from '@mikro-orm/postgresql';
import { subscribesToBuildMailByDefault, type ProjectRole } from '@earmark/contracts';
import { Membership, Project, User } from '../entities/index.js';
import { hashPassword } from '../users/passwords.js';

export const TEST_PASSWORD = 'correct horse battery';

export interface RoleFixture {
  project: Project;
  otherProject: Project;
  users: Record<ProjectRole | 'admin' | 'outsider', User>;
}

/**
 * Test seed: two projects and one user per role in the first (`<role>@example.test`),
 * plus an outsider who belongs to the second project only. Low bcrypt cost: tests only.
 */
export async function seedRoles(em: EntityManager): Promise<RoleFixture> {
  const passwordHash = await hashPassword(TEST_PASSWORD, 4);
  const project = em.create(Project, { key: 'alpha-dsp', name: 'Alpha DSP' });
  const otherProject = em.create(Project, { key: 'beta-dsp', name: 'Beta DSP' });
  const mk = (name: string, isAdmin = false) =>
    em.create(User, { email: `${name}@example.test`, displayName: name, passwordHash, isAdmin });
  const users = {
    admin: mk('admin', true),
    qa_manager: mk('qa_manager'),
    engineer: mk('engineer'),
    viewer: mk('viewer'),
    outsider: mk('outsider'),
  };
  for (const role of ['qa_manager', 'engineer', 'viewer'] as const) em.create(Membership, { project, user: users[role], role, subscribed: subscribesToBuildMailByDefault(role) });
  em.create(Membership, { project: otherProject, user: users.outsider, role: 'engineer', subscribed: subscribesToBuildMailByDefault('engineer') });
  await em.flush();
  return { project, otherProject, users };
}
