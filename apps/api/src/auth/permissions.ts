import type { ProjectRole, TokenScope } from '@earmark/contracts';

/**
 * The permission matrix: every route names one permission, and this module alone
 * decides who holds it. Admins hold every permission in every project.
 */
export const projectPermissions = [
  'project.read',
  /** One's own build-mail setting in the project: every member, viewers included. */
  'mail.subscribe',
  'build.read',
  'build.submit',
  'finding.triage',
  'mask.draft',
  'mask.approve',
  'waiver.request',
  /** Approve, reject and revoke waivers. */
  'waiver.decide',
  'audit.read',
  'project.configure',
  'project.administer',
] as const;
export type ProjectPermission = (typeof projectPermissions)[number];

const viewer: ProjectPermission[] = ['project.read', 'mail.subscribe', 'build.read'];
const engineer: ProjectPermission[] = [...viewer, 'build.submit', 'finding.triage', 'mask.draft', 'waiver.request', 'project.configure'];
// The same people approve masks and decide their exceptions (waivers).
const qaManager: ProjectPermission[] = [...engineer, 'mask.approve', 'waiver.decide', 'audit.read'];

export const ROLE_PERMISSIONS: Record<ProjectRole, ReadonlySet<ProjectPermission>> = {
  viewer: new Set(viewer),
  engineer: new Set(engineer),
  qa_manager: new Set(qaManager),
};

/** What a CI token scope lets it do on the /api/v1 routes of its own project. */
export const SCOPE_PERMISSIONS: Record<TokenScope, ReadonlySet<ProjectPermission>> = {
  'read-verdicts': new Set(['project.read', 'build.read']),
  'submit-captures': new Set(['build.submit']),
};

export function roleGrants(role: ProjectRole, permission: ProjectPermission): boolean {
  return ROLE_PERMISSIONS[role].has(permission);
}

export function scopesGrant(scopes: readonly TokenScope[], permission: ProjectPermission): boolean {
  return scopes.some((scope) => SCOPE_PERMISSIONS[scope].has(permission));
}

/**
 * Who may call a route:
 * - `public`: anyone (sign-in, health);
 * - `user`: any signed-in person;
 * - `admin`: global admins;
 * - `project`: people whose role in the route's `:project` grants the permission;
 * - `ci`: the same people, or an API token of that project whose scopes grant it.
 */
export type Access =
  | { kind: 'public' }
  | { kind: 'user' }
  | { kind: 'admin' }
  | { kind: 'project'; permission: ProjectPermission }
  | { kind: 'ci'; permission: ProjectPermission };
