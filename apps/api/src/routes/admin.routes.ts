import { type AuditEventRow, AuditEventRow as AuditEventRowSchema, CreateUserRequest, Page, type UserRow, UserRow as UserRowSchema } from '@earmark/contracts';
import { AuditEvent, User, hashPassword } from '@earmark/db';
import { z } from 'zod';

import { ConflictError } from '../errors.js';
import { recordAudit } from '@earmark/domain';
import { requireUser, route, type RouteDef } from '../http/route.js';

const PageQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});

const toUserRow = (u: User): UserRow => ({
  id: u.id,
  email: u.email,
  displayName: u.displayName,
  isAdmin: u.isAdmin,
  disabled: u.disabled,
  createdAt: u.createdAt.toISOString(),
});

export function adminRoutes(): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/api/admin/users',
      access: { kind: 'admin' },
      summary: 'All users',
      response: z.object({ items: z.array(UserRowSchema) }),
      async handle({ res, em }) {
        const users = await em.find(User, {}, { orderBy: { email: 'asc' } });
        res.json({ items: users.map(toUserRow) });
      },
    }),
    route({
      method: 'post',
      path: '/api/admin/users',
      access: { kind: 'admin' },
      summary: 'Create a user with a password',
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
      method: 'get',
      path: '/api/admin/audit',
      access: { kind: 'admin' },
      summary: 'The audit log, newest first, paged',
      query: PageQuery,
      response: Page(AuditEventRowSchema),
      async handle({ query: { page, pageSize }, res, em }) {
        const [events, total] = await em.findAndCount(
          AuditEvent,
          {},
          { populate: ['project'], orderBy: { createdAt: 'desc' }, limit: pageSize, offset: (page - 1) * pageSize },
        );
        const items: AuditEventRow[] = events.map((e) => ({
          id: e.id,
          at: e.createdAt.toISOString(),
          actor: e.actor,
          action: e.action,
          subject: e.subject,
          projectKey: e.project?.key ?? null,
          details: e.details,
        }));
        res.json({ items, total, page, pageSize });
      },
    }),
  ];
}
