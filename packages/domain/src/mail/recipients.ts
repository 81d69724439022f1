import type { EntityManager } from '@mikro-orm/postgresql';
import { Membership, type Project, type User } from '@earmark/db';

/** The project's QA managers, without the people in `except` (the actor, the author: they cannot decide on their own work). */
export async function qaManagersOf(em: EntityManager, project: Project, except: readonly User[] = []): Promise<User[]> {
  const skip = new Set(except.map((u) => u.id));
  const managers = await em.find(Membership, { project, role: 'qa_manager' }, { populate: ['user'], orderBy: { user: { email: 'asc' } } });
  return managers.map((m) => m.user).filter((u) => !skip.has(u.id));
}

/** Members who keep build-failure mail of the project switched on (`Membership.subscribed`). */
export async function buildMailSubscribersOf(em: EntityManager, project: Project): Promise<User[]> {
  const members = await em.find(Membership, { project, subscribed: true }, { populate: ['user'], orderBy: { user: { email: 'asc' } } });
  return members.map((m) => m.user);
}
