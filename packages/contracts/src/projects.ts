import { z } from 'zod';
import { ProjectRole, TokenScope } from './roles.js';

/** Project keys are lower-case slugs such as `kestrel-buds`. */
export const ProjectKey = z
  .string()
  .min(2)
  .max(40)
  .regex(/^[a-z][a-z0-9-]*[a-z0-9]$/, 'lower-case letters, digits and dashes, starting with a letter');

export const Project = z.object({
  key: ProjectKey,
  name: z.string(),
  description: z.string(),
  createdAt: z.string(),
  /** The caller's role in this project; `admin` for global admins without a membership. */
  myRole: z.enum(['admin', 'qa_manager', 'engineer', 'viewer']),
  targetCount: z.number().int(),
  testCaseCount: z.number().int(),
  buildCount: z.number().int(),
  /** Bytes of capture audio the project stores now (captures whose audio was purged do not count). */
  storageUsedBytes: z.number().int(),
  /** The quota in force, bytes; null: unlimited. */
  storageQuotaBytes: z.number().int().nullable(),
  /** Where the quota comes from: the project's own setting, or the server's default (EARMARK_PROJECT_QUOTA_BYTES). */
  storageQuotaSource: z.enum(['project', 'default']),
  /** When an administrator archived the project; null while it is in use. */
  archivedAt: z.string().nullable(),
});
export type Project = z.infer<typeof Project>;

export const CreateProjectRequest = z.object({
  key: ProjectKey,
  name: z.string().min(1).max(120),
  description: z.string().max(2000).default(''),
});
export type CreateProjectRequest = z.infer<typeof CreateProjectRequest>;

export const MemberRow = z.object({
  userId: z.string(),
  email: z.string(),
  displayName: z.string(),
  role: ProjectRole,
});
export type MemberRow = z.infer<typeof MemberRow>;

export const SetMembershipRequest = z.object({ email: z.email(), role: ProjectRole });
export type SetMembershipRequest = z.infer<typeof SetMembershipRequest>;

export const ApiTokenRow = z.object({
  id: z.string(),
  name: z.string(),
  prefix: z.string(),
  scopes: z.array(TokenScope),
  createdAt: z.string(),
  lastUsedAt: z.string().nullable(),
  revokedAt: z.string().nullable(),
  /** After this instant the token is refused; null: it never expires. */
  expiresAt: z.string().nullable(),
});
export type ApiTokenRow = z.infer<typeof ApiTokenRow>;

export const CreateApiTokenRequest = z.object({
  name: z.string().min(1).max(80),
  scopes: z.array(TokenScope).min(1).default(['submit-captures', 'read-verdicts']),
  /** When the token stops working (ISO 8601 with offset, in the future); null or absent: never. */
  expiresAt: z.iso.datetime({ offset: true }).nullable().optional(),
});
export type CreateApiTokenRequest = z.infer<typeof CreateApiTokenRequest>;

/** The only response that carries a token's secret; it is never shown again. */
export const CreatedApiToken = ApiTokenRow.extend({ secret: z.string() });
export type CreatedApiToken = z.infer<typeof CreatedApiToken>;
