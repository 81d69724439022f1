import { projectRoles, type CurrentUser, type Role } from '@earmark/contracts';

/**
 * The one role the user menu shows: `admin` for global admins, otherwise the most
 * privileged role across the user's project memberships, or null with none.
 */
export function highestRole(user: CurrentUser): Role | null {
  if (user.isAdmin) return 'admin';
  let best = -1;
  for (const membership of user.memberships) {
    best = Math.max(best, projectRoles.indexOf(membership.role));
  }
  return projectRoles[best] ?? null;
}
