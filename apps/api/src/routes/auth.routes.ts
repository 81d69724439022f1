import { CurrentUser, LoginRequest, RefreshRequest, Session } from '@earmark/contracts';
import type { RequestHandler } from 'express';
import { parseWith } from '@earmark/domain';
import { toCurrentUser, type SessionService } from '../auth/session.service.js';
import { requireUser, type RouteDef } from '../http/route.js';

export function authRoutes(sessions: SessionService, loginLimiter: RequestHandler): RouteDef[] {
  return [
    {
      method: 'post',
      path: '/api/auth/login',
      access: { kind: 'public' },
      summary: 'Sign in with e-mail and password; returns access and refresh tokens',
      doc: { body: LoginRequest, response: Session },
      before: [loginLimiter],
      async handle({ req, res, em }) {
        const body = parseWith(LoginRequest, req.body, 'body');
        res.json(await sessions.login(em, body.email, body.password));
      },
    },
    {
      method: 'post',
      path: '/api/auth/refresh',
      access: { kind: 'public' },
      summary: 'Exchange a refresh token for a new session',
      doc: { body: RefreshRequest, response: Session },
      async handle({ req, res, em }) {
        const body = parseWith(RefreshRequest, req.body, 'body');
        res.json(await sessions.refresh(em, body.refreshToken));
      },
    },
    {
      method: 'post',
      path: '/api/auth/logout',
      access: { kind: 'user' },
      summary: 'End every session of the signed-in user',
      doc: { status: 204 },
      async handle(ctx) {
        await sessions.logout(ctx.em, requireUser(ctx).user);
        ctx.res.status(204).end();
      },
    },
    {
      method: 'get',
      path: '/api/me',
      access: { kind: 'user' },
      summary: 'The signed-in user with their project roles',
      doc: { response: CurrentUser },
      async handle(ctx) {
        const { user, memberships } = requireUser(ctx);
        ctx.res.json(toCurrentUser(user, memberships));
      },
    },
  ];
}
