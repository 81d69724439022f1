import type { ApiToken, Membership, Project, User } from '@earmark/db';

/** Who is calling: a signed-in person, or a project's CI token. */
export type Principal =
  | { kind: 'user'; user: User; memberships: Membership[] }
  | { kind: 'token'; token: ApiToken; project: Project };

/** How the principal appears in the audit log. */
export function actorName(principal: Principal): string {
  return principal.kind === 'user' ? `user:${principal.user.email}` : `token:${principal.token.prefix}`;
}
