import { z } from 'zod';
import { ProjectRole } from './roles.js';

export const LoginRequest = z.object({
  email: z.email().max(254),
  password: z.string().min(1).max(200),
});
export type LoginRequest = z.infer<typeof LoginRequest>;

export const RefreshRequest = z.object({ refreshToken: z.string().min(1).max(4096) });
export type RefreshRequest = z.infer<typeof RefreshRequest>;

export const Membership = z.object({
  projectKey: z.string(),
  projectName: z.string(),
  role: ProjectRole,
});
export type Membership = z.infer<typeof Membership>;

export const CurrentUser = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  isAdmin: z.boolean(),
  memberships: z.array(Membership),
});
export type CurrentUser = z.infer<typeof CurrentUser>;

export const Session = z.object({
  accessToken: z.string(),
  /** Seconds until the access token expires. */
  expiresIn: z.number().int(),
  refreshToken: z.string(),
  user: CurrentUser,
});
export type Session = z.infer<typeof Session>;
