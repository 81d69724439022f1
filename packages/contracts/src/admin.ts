import { z } from 'zod';
import { NewPassword, UserRow } from './users.js';

/**
 * Workspace administration (admins only): people, their invitations and password resets, and
 * the workspace audit log. Routes:
 *   GET    /api/admin/users                            → { items: UserRow[] }
 *   POST   /api/admin/users/invitations                InviteUserRequest → InvitedUser (201)
 *   PATCH  /api/admin/users/:userId                    UpdateUserRequest → UserRow
 *   POST   /api/admin/users/:userId/password-reset     → AccountLinkSent (202)
 *   GET    /api/admin/audit?actor&action&project&from&to&page&pageSize → WorkspaceAuditPage
 * and, public, the page an invitee or a person whose password was reset opens:
 *   GET    /api/account-links/:secret                  → AccountLinkInfo
 *   POST   /api/account-links/:secret                  SetPasswordWithLinkRequest → 204
 */

/** How long a mailed invitation or reset link works. */
export const ACCOUNT_LINK_TTL_HOURS = 72;

export const InviteUserRequest = z.strictObject({
  email: z.email('a valid e-mail address').max(254),
  displayName: z.string().trim().min(1, 'give the person a name').max(120),
  isAdmin: z.boolean().default(false),
});
export type InviteUserRequest = z.infer<typeof InviteUserRequest>;

/** When the mailed link stops working. */
export const AccountLinkSent = z.object({ expiresAt: z.string() });
export type AccountLinkSent = z.infer<typeof AccountLinkSent>;

export const InvitedUser = z.object({ user: UserRow, expiresAt: z.string() });
export type InvitedUser = z.infer<typeof InvitedUser>;

export const UpdateUserRequest = z
  .strictObject({
    disabled: z.boolean().optional(),
    isAdmin: z.boolean().optional(),
    displayName: z.string().trim().min(1).max(120).optional(),
  })
  .refine((b) => b.disabled !== undefined || b.isAdmin !== undefined || b.displayName !== undefined, { message: 'give disabled, isAdmin or displayName' });
export type UpdateUserRequest = z.infer<typeof UpdateUserRequest>;

/** The link's secret: 43 base64url characters (32 random bytes). */
export const AccountLinkSecret = z.string().regex(/^[A-Za-z0-9_-]{43}$/, 'not an Earmark account link');

export const AccountLinkInfo = z.object({
  purpose: z.enum(['invite', 'reset']),
  email: z.string(),
  displayName: z.string(),
  expiresAt: z.string(),
});
export type AccountLinkInfo = z.infer<typeof AccountLinkInfo>;

export const SetPasswordWithLinkRequest = z.strictObject({ password: NewPassword });
export type SetPasswordWithLinkRequest = z.infer<typeof SetPasswordWithLinkRequest>;

/** Something an audit event names, with its display name and, when it has a page, that page's in-app path. */
export const AuditEntityRef = z.object({
  /** What the log stored, e.g. `user:qa@example.test`, `build:3f2a…`. */
  ref: z.string(),
  /** `user`, `token`, `project`, `build`, `capture`, `mask`, `test-case`, `target`, `finding`, `waiver`, `system`, … */
  kind: z.string(),
  label: z.string(),
  /** In-app path of its page (`/projects/kestrel-buds/builds/3f2a…`); null when it has none or no longer exists. */
  href: z.string().nullable(),
});
export type AuditEntityRef = z.infer<typeof AuditEntityRef>;

export const WorkspaceAuditRow = z.object({
  id: z.string(),
  at: z.string(),
  action: z.string(),
  /** The raw actor and subject as stored, for scripts; the refs carry names. */
  actor: z.string(),
  subject: z.string(),
  actorRef: AuditEntityRef,
  subjectRef: AuditEntityRef,
  projectKey: z.string().nullable(),
  projectName: z.string().nullable(),
  details: z.record(z.string(), z.unknown()),
});
export type WorkspaceAuditRow = z.infer<typeof WorkspaceAuditRow>;

const dateOrDateTime = z.union([z.iso.date(), z.iso.datetime({ offset: true })], 'a date (2026-12-03) or date-time with offset');

export const WorkspaceAuditQuery = z
  .object({
    /** Exact actor (`user:qa@example.test`), or an e-mail, which means `user:<e-mail>`. */
    actor: z.string().trim().max(300).optional(),
    /** Exact action (`user.invite`) or a prefix ending in a dot (`membership.`). */
    action: z.string().trim().max(80).optional(),
    /** Project key. */
    project: z.string().trim().max(40).optional(),
    /** From this date (start of the day, UTC) or instant. */
    from: dateOrDateTime.optional(),
    /** Up to and including this date (end of the day, UTC) or instant. */
    to: dateOrDateTime.optional(),
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(200).default(50),
  })
  .refine((q) => !q.from || !q.to || boundOf(q.from, 'start') <= boundOf(q.to, 'end'), { path: ['to'], message: 'must not be before from' });
export type WorkspaceAuditQuery = z.infer<typeof WorkspaceAuditQuery>;

/** A bare date covers the whole day (UTC). */
export function boundOf(value: string, side: 'start' | 'end'): Date {
  if (/^\d{4}-\d{2}-\d{2}$/.test(value)) return new Date(`${value}T${side === 'start' ? '00:00:00.000' : '23:59:59.999'}Z`);
  return new Date(value);
}

export const WorkspaceAuditPage = z.object({
  items: z.array(WorkspaceAuditRow),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
});
export type WorkspaceAuditPage = z.infer<typeof WorkspaceAuditPage>;
