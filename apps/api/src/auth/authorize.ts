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

/** The one 404 for "there is no such project" and "it is not yours": the two must read the same. */
export function projectNotFoundDetail(projectKey: string): string {
  return `There is no project ${projectKey}, or you have no access to it.`;
}

/**
 * Decides one request against its route's access rule.
 * Non-members and other projects' CI tokens get the same 404 as for a project (or a resource
 * of one) that does not exist: its existence is not theirs to learn. Members whose role lacks
 * the permission, and the project's own tokens lacking the scope, get 403.
 * @param projectKey the route's project; `null` when the resource the path names does not exist.
 * @param notFoundDetail the 404's detail, when the path names a resource rather than the project.
 * @throws AuthError, ForbiddenError, NotFoundError
 */
export async function authorize(
  access: Access,
  principal: Principal | null,
  projectKey: string | null | undefined,
  em: EntityManager,
  notFoundDetail?: string,
): Promise<Authorized> {
  if (access.kind === 'public') return { principal, project: null };
  const hidden = () => new NotFoundError(notFoundDetail ?? projectNotFoundDetail(projectKey ?? ''));
  if (!principal) throw new AuthError();

  if (principal.kind === 'token') {
    if (access.kind !== 'ci') throw new ForbiddenError('API tokens are accepted only on the CI routes under /api/v1.');
    if (projectKey !== principal.project.key) throw hidden();
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

  if (projectKey === undefined) throw new Error(`route with ${access.kind} access has no :project parameter`);
  if (projectKey === null) throw hidden();
  const membership = memberships.find((m) => m.project.key === projectKey);
  if (user.isAdmin) {
    const project = membership?.project ?? (await em.findOne(Project, { key: projectKey }));
    if (!project) throw hidden();
    return { principal, project };
  }
  if (!membership) throw hidden();
  // An archived project stays readable to administrators only (the branch above).
  if (membership.project.archivedAt) throw hidden();
  if (!roleGrants(membership.role, access.permission)) {
    throw new ForbiddenError(`Your role in ${projectKey} (${membership.role}) does not allow ${access.permission}.`);
  }
  return { principal, project: membership.project };
}
