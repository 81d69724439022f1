import { CurrentUser, LoginRequest, RefreshRequest, Session } from '@earmark/contracts';
import type { RequestHandler } from 'express';
import { toCurrentUser, type SessionService } from '../auth/session.service.js';
import { requireUser, route, type RouteDef } from '../http/route.js';

export function authRoutes(sessions: SessionService, loginLimiter: RequestHandler): RouteDef[] {
  return [
    route({
      method: 'post',
      path: '/api/auth/login',
      access: { kind: 'public' },
      summary: 'Sign in with e-mail and password; returns access and refresh tokens',
      body: LoginRequest,
      response: Session,
      before: [loginLimiter],
      async handle({ body, res, em }) {
        res.json(await sessions.login(em, body.email, body.password));
      },
    }),
    route({
      method: 'post',
      path: '/api/auth/refresh',
      access: { kind: 'public' },
      summary: 'Exchange a refresh token for a new session',
      body: RefreshRequest,
      response: Session,
      async handle({ body, res, em }) {
        res.json(await sessions.refresh(em, body.refreshToken));
      },
    }),
    route({
      method: 'post',
      path: '/api/auth/logout',
      access: { kind: 'user' },
      summary: 'End every session of the signed-in user',
      status: 204,
      async handle(ctx) {
        await sessions.logout(ctx.em, requireUser(ctx).user);
        ctx.res.status(204).end();
      },
    }),
    route({
      method: 'get',
      path: '/api/me',
      access: { kind: 'user' },
      summary: 'The signed-in user with their project roles',
      response: CurrentUser,
      async handle(ctx) {
        const { user, memberships } = requireUser(ctx);
        ctx.res.json(toCurrentUser(user, memberships));
      },
    }),
  ];
}
