import {
  AccountLinkSent,
  CreateUserRequest,
  InviteUserRequest,
  InvitedUser,
  UpdateUserRequest,
  UserRow as UserRowSchema,
  WorkspaceAuditPage,
  WorkspaceAuditQuery,
} from '@earmark/contracts';
import { User, hashPassword } from '@earmark/db';
import { z } from 'zod';

import { ConflictError } from '../errors.js';
import { recordAudit, toUserRow, workspaceAudit, type Gate } from '@earmark/domain';
import { requireUser, route, type RouteContext, type RouteDef } from '../http/route.js';
import { wakeMailSender } from '../http/wake-mail-sender.js';

const UserIdParams = z.object({ userId: z.uuid('a user id (UUID)') });

export function adminRoutes(gate: Pick<Gate, 'users' | 'jobs'>): RouteDef[] {
  const { users } = gate;
  const sendMail = (ctx: RouteContext) => wakeMailSender(gate.jobs, ctx);
  return [
    route({
      method: 'get',
      path: '/api/admin/users',
      access: { kind: 'admin' },
      summary: 'All users with their status (active, invited, disabled)',
      response: z.object({ items: z.array(UserRowSchema) }),
      async handle({ res, em }) {
        res.json({ items: await users.list(em) });
      },
    }),
    route({
      method: 'post',
      path: '/api/admin/users',
      access: { kind: 'admin' },
      summary: 'Create a user with a password (scripts; people are invited instead)',
      body: CreateUserRequest,
      response: UserRowSchema,
      status: 201,
      async handle(ctx) {
        const body = ctx.body;
        const email = body.email.toLowerCase();
        if (await ctx.em.findOne(User, { email })) throw new ConflictError(`A user with e-mail ${email} already exists.`);
        const user = ctx.em.create(User, {
          email,
          displayName: body.displayName,
          passwordHash: await hashPassword(body.password),
          isAdmin: body.isAdmin,
        });
        recordAudit(ctx.em, { actor: `user:${requireUser(ctx).user.email}`, action: 'user.create', subject: `user:${email}`, details: { isAdmin: body.isAdmin } });
        await ctx.em.flush();
        ctx.res.status(201).json(toUserRow(user));
      },
    }),
    route({
      method: 'post',
      path: '/api/admin/users/invitations',
      access: { kind: 'admin' },
      summary: `Invite a person by e-mail: they get a one-time link (valid 72 h) to choose their password, and cannot sign in before`,
      body: InviteUserRequest,
      response: InvitedUser,
      status: 201,
      async handle(ctx) {
        const { user, expiresAt } = await users.invite(ctx.em, ctx.body, requireUser(ctx).user);
        await sendMail(ctx);
        ctx.res.status(201).json({ user: toUserRow(user), expiresAt: expiresAt.toISOString() });
      },
    }),
    route({
      method: 'patch',
      path: '/api/admin/users/:userId',
      access: { kind: 'admin' },
      summary: 'Disable or enable a user (disabling ends their sessions), or change the administrator flag or name; one active administrator always remains',
      params: UserIdParams,
      body: UpdateUserRequest,
      response: UserRowSchema,
      async handle(ctx) {
        const user = await users.update(ctx.em, ctx.params.userId, ctx.body, requireUser(ctx).user);
        ctx.res.json(toUserRow(user));
      },
    }),
    route({
      method: 'post',
      path: '/api/admin/users/:userId/password-reset',
      access: { kind: 'admin' },
      summary: 'Mail the user a one-time link (valid 72 h) to choose a new password; earlier links stop working',
      params: UserIdParams,
      response: AccountLinkSent,
      status: 202,
      async handle(ctx) {
        const { expiresAt } = await users.sendPasswordReset(ctx.em, ctx.params.userId, requireUser(ctx).user);
        await sendMail(ctx);
        ctx.res.status(202).json({ expiresAt: expiresAt.toISOString() });
      },
    }),
    route({
      method: 'get',
      path: '/api/admin/audit',
      access: { kind: 'admin' },
      summary: 'The workspace audit log, newest first, paged; filters: actor (e-mail or `kind:id`), action (exact or prefix ending in a dot), project key, from/to dates. Rows name the actor and the subject, with their pages',
      query: WorkspaceAuditQuery,
      response: WorkspaceAuditPage,
      async handle({ query, res, em }) {
        res.json(await workspaceAudit(em, query));
      },
    }),
  ];
}
