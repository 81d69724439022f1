import type { EntityManager } from '@mikro-orm/postgresql';
import { Project } from '@earmark/db';
import { AuthError, ForbiddenError, NotFoundError } from '../errors.js';
import { roleGrants, scopesGrant, type Access } from './permissions.js';
import type { Principal } from '@earmark/domain';

export interface Authorized {
  principal: Principal | null;
  /** The route's `:project`, resolved, for project and CI routes. */
  project: Project | null;
}

/**
 * Decides one request against its route's access rule.
 * Non-members get 404 for a project (its existence is not theirs to learn); members
 * whose role lacks the permission get 403.
 * @throws AuthError, ForbiddenError, NotFoundError
 */
export async function authorize(
  access: Access,
  principal: Principal | null,
  projectKey: string | undefined,
  em: EntityManager,
): Promise<Authorized> {
  if (access.kind === 'public') return { principal, project: null };
  if (!principal) throw new AuthError();

  if (principal.kind === 'token') {
    if (access.kind !== 'ci') throw new ForbiddenError('API tokens are accepted only on the CI routes under /api/v1.');
    if (projectKey !== principal.project.key) throw new ForbiddenError(`This API token belongs to project ${principal.project.key}.`);
    if (!scopesGrant(principal.token.scopes, access.permission)) {
      throw new ForbiddenError(`This API token's scopes (${principal.token.scopes.join(', ')}) do not allow ${access.permission}.`);
    }
    return { principal, project: principal.project };
  }

  const { user, memberships } = principal;
  if (access.kind === 'user') return { principal, project: null };
  if (access.kind === 'admin') {
    if (!user.isAdmin) throw new ForbiddenError('Only administrators may do this.');
    return { principal, project: null };
  }

  if (!projectKey) throw new Error(`route with ${access.kind} access has no :project parameter`);
  const membership = memberships.find((m) => m.project.key === projectKey);
  if (user.isAdmin) {
    const project = membership?.project ?? (await em.findOne(Project, { key: projectKey }));
    if (!project) throw new NotFoundError(`There is no project ${projectKey}.`);
    return { principal, project };
  }
  if (!membership) throw new NotFoundError(`There is no project ${projectKey}, or you are not a member of it.`);
  if (!roleGrants(membership.role, access.permission)) {
    throw new ForbiddenError(`Your role in ${projectKey} (${membership.role}) does not allow ${access.permission}.`);
  }
  return { principal, project: membership.project };
}
