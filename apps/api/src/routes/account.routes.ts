import { ChangePasswordRequest, Session } from '@earmark/contracts';
import type { RequestHandler } from 'express';
import type { SessionService } from '../auth/session.service.js';
import { requireUser, route, type RouteDef } from '../http/route.js';

/** What every signed-in user may do to their own account (mail settings are per project: subscription.routes.ts). */
export function accountRoutes(sessions: SessionService, passwordChangeGuard: RequestHandler): RouteDef[] {
  return [
    route({
      method: 'put',
      path: '/api/me/password',
      access: { kind: 'user' },
      summary: 'Change your own password; every other session of yours ends and the answer is a fresh session',
      body: ChangePasswordRequest,
      response: Session,
      before: [passwordChangeGuard],
      async handle(ctx) {
        const { user } = requireUser(ctx);
        ctx.res.json(await sessions.changePassword(ctx.em, user, ctx.body.currentPassword, ctx.body.newPassword));
      },
    }),
  ];
}
