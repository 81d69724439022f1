import { z } from 'zod';

/** Project-scoped roles, lowest privilege first. `admin` is global (User.isAdmin). */
export const projectRoles = ['viewer', 'engineer', 'qa_manager'] as const;
export const ProjectRole = z.enum(projectRoles);
export type ProjectRole = z.infer<typeof ProjectRole>;

/** What a signed-in user is, as the web app and the API see it. */
export const Role = z.enum(['admin', ...projectRoles]);
export type Role = z.infer<typeof Role>;

/** Permissions a CI API token may carry (scoped to one project). */
export const tokenScopes = ['submit-captures', 'read-verdicts'] as const;
export const TokenScope = z.enum(tokenScopes);
export type TokenScope = z.infer<typeof TokenScope>;
