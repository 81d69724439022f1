import { z } from 'zod';
import type { ProjectRole } from './roles.js';

/**
 * A member's own mail setting in one project: whether build-failure (and drift) mail of the
 * project reaches them. Returned by `GET /api/projects/:project/subscription`.
 */
export const ProjectSubscription = z.object({ buildFailures: z.boolean() });
export type ProjectSubscription = z.infer<typeof ProjectSubscription>;

/** Body of `PUT /api/projects/:project/subscription`: the caller's own setting. */
export const SetProjectSubscriptionRequest = z.object({ buildFailures: z.boolean() });
export type SetProjectSubscriptionRequest = z.infer<typeof SetProjectSubscriptionRequest>;

/**
 * The setting a membership starts with (and gets again when its role changes): the people who
 * fix and sign off builds hear about failures; viewers read along and may opt in.
 */
export function subscribesToBuildMailByDefault(role: ProjectRole): boolean {
  return role === 'engineer' || role === 'qa_manager';
}
