import { z } from 'zod';

export const UserRow = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  isAdmin: z.boolean(),
  disabled: z.boolean(),
  /** `invited`: has not set a password through the invitation link yet; `disabled` wins over it. */
  status: z.enum(['active', 'invited', 'disabled']),
  createdAt: z.string(),
  lastLoginAt: z.string().nullable(),
});
export type UserRow = z.infer<typeof UserRow>;

/** bcrypt reads only the first 72 bytes of a password; longer ones would be silently cut. */
export const MAX_PASSWORD_BYTES = 72;
export const passwordBytes = (password: string): number => new TextEncoder().encode(password).length;

/** A password being set: long enough to resist guessing, short enough that all of it counts. */
export const NewPassword = z
  .string()
  .min(10, 'at least 10 characters')
  .refine((p) => passwordBytes(p) <= MAX_PASSWORD_BYTES, `at most ${MAX_PASSWORD_BYTES} bytes (UTF-8); letters such as ä take two`);

export const CreateUserRequest = z.object({
  email: z.email().max(254),
  displayName: z.string().min(1).max(120),
  password: NewPassword,
  isAdmin: z.boolean().default(false),
});
export type CreateUserRequest = z.infer<typeof CreateUserRequest>;

export const AuditEventRow = z.object({
  id: z.string(),
  at: z.string(),
  actor: z.string(),
  action: z.string(),
  subject: z.string(),
  projectKey: z.string().nullable(),
  details: z.record(z.string(), z.unknown()),
});
export type AuditEventRow = z.infer<typeof AuditEventRow>;

export const Page = <T extends z.ZodType>(item: T) =>
  z.object({ items: z.array(item), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() });
