import { ProjectSubscription, SetProjectSubscriptionRequest } from '@earmark/contracts';
import type { SubscriptionService } from '@earmark/domain';
import { requireProject, requireUser, route, type RouteDef } from '../http/route.js';

/** The caller's own build-mail setting in a project (build failures and drift). */
export function subscriptionRoutes(subscriptions: SubscriptionService): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/api/projects/:project/subscription',
      access: { kind: 'project', permission: 'mail.subscribe' },
      summary: 'Whether build-failure mail of the project reaches you',
      response: ProjectSubscription,
      async handle(ctx) {
        ctx.res.json(await subscriptions.get(ctx.em, requireProject(ctx), requireUser(ctx).user));
      },
    }),
    route({
      method: 'put',
      path: '/api/projects/:project/subscription',
      access: { kind: 'project', permission: 'mail.subscribe' },
      summary: 'Switch build-failure mail of the project on or off for yourself (a global admin must be a member)',
      body: SetProjectSubscriptionRequest,
      response: ProjectSubscription,
      async handle(ctx) {
        ctx.res.json(await subscriptions.set(ctx.em, requireProject(ctx), requireUser(ctx).user, ctx.body.buildFailures));
      },
    }),
  ];
}
