import { z } from 'zod';

export const UserRow = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  isAdmin: z.boolean(),
  disabled: z.boolean(),
  createdAt: z.string(),
});
export type UserRow = z.infer<typeof UserRow>;

export const CreateUserRequest = z.object({
  email: z.email().max(254),
  displayName: z.string().min(1).max(120),
  password: z.string().min(10, 'at least 10 characters').max(200),
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
