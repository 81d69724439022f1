import type { EntityManager } from '@mikro-orm/postgresql';
import type { ProjectSubscription } from '@earmark/contracts';
import { Membership, type Project, type User } from '@earmark/db';
import { ConflictError } from '../errors.js';

/**
 * A member's own build-mail setting in a project (`Membership.subscribed`): whether build-failure
 * and drift mail reach them. Each person reads and changes only their own.
 */
export class SubscriptionService {
  /** A global admin without a membership receives no project mail: `buildFailures` is false. */
  async get(em: EntityManager, project: Project, user: User): Promise<ProjectSubscription> {
    const membership = await em.findOne(Membership, { project, user });
    return { buildFailures: membership?.subscribed ?? false };
  }

  /** @throws ConflictError for a global admin who is not a member (there is no membership to hold the setting). */
  async set(em: EntityManager, project: Project, user: User, buildFailures: boolean): Promise<ProjectSubscription> {
    const membership = await em.findOne(Membership, { project, user });
    if (!membership) {
      throw new ConflictError(`You are not a member of ${project.key}, so no project mail reaches you; an administrator can add you as a member first.`);
    }
    membership.subscribed = buildFailures;
    await em.flush();
    return { buildFailures: membership.subscribed };
  }
}
