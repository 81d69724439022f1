import { ApiTokenRow, CreateApiTokenRequest, CreatedApiToken } from '@earmark/contracts';
import { z } from 'zod';
import { type TokenService } from '@earmark/domain';
import { requireProject, requireUser, route, type RouteDef } from '../http/route.js';

const TokenParams = z.object({ tokenId: z.uuid() });

export function tokenRoutes(tokens: TokenService): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/api/projects/:project/tokens',
      access: { kind: 'project', permission: 'project.administer' },
      summary: "A project's CI tokens (never their secrets)",
      response: z.object({ items: z.array(ApiTokenRow) }),
      async handle(ctx) {
        ctx.res.json({ items: await tokens.list(ctx.em, requireProject(ctx)) });
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/tokens',
      access: { kind: 'project', permission: 'project.administer' },
      summary: 'Create a CI token; the response is the only time its secret is shown',
      body: CreateApiTokenRequest,
      response: CreatedApiToken,
      status: 201,
      async handle(ctx) {
        const body = ctx.body;
        ctx.res.status(201).json(await tokens.create(ctx.em, requireProject(ctx), body, requireUser(ctx).user));
      },
    }),
    route({
      method: 'delete',
      path: '/api/projects/:project/tokens/:tokenId',
      access: { kind: 'project', permission: 'project.administer' },
      summary: 'Revoke a CI token',
      params: TokenParams,
      response: ApiTokenRow,
      async handle(ctx) {
        const { tokenId } = ctx.params;
        ctx.res.json(await tokens.revoke(ctx.em, requireProject(ctx), tokenId, requireUser(ctx).user));
      },
    }),
  ];
}
