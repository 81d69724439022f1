import { ApiTokenRow, CreateApiTokenRequest, CreatedApiToken } from '@earmark/contracts';
import { z } from 'zod';
import { parseWith, type TokenService } from '@earmark/domain';
import { requireProject, requireUser, type RouteDef } from '../http/route.js';

const TokenParams = z.object({ tokenId: z.uuid() });

export function tokenRoutes(tokens: TokenService): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/projects/:project/tokens',
      access: { kind: 'project', permission: 'project.administer' },
      summary: "A project's CI tokens (never their secrets)",
      doc: { response: z.object({ items: z.array(ApiTokenRow) }) },
      async handle(ctx) {
        ctx.res.json({ items: await tokens.list(ctx.em, requireProject(ctx)) });
      },
    },
    {
      method: 'post',
      path: '/api/projects/:project/tokens',
      access: { kind: 'project', permission: 'project.administer' },
      summary: 'Create a CI token; the response is the only time its secret is shown',
      doc: { body: CreateApiTokenRequest, response: CreatedApiToken, status: 201 },
      async handle(ctx) {
        const body = parseWith(CreateApiTokenRequest, ctx.req.body, 'body');
        ctx.res.status(201).json(await tokens.create(ctx.em, requireProject(ctx), body, requireUser(ctx).user));
      },
    },
    {
      method: 'delete',
      path: '/api/projects/:project/tokens/:tokenId',
      access: { kind: 'project', permission: 'project.administer' },
      summary: 'Revoke a CI token',
      doc: { response: ApiTokenRow },
      async handle(ctx) {
        const { tokenId } = parseWith(TokenParams, ctx.req.params, 'params');
        ctx.res.json(await tokens.revoke(ctx.em, requireProject(ctx), tokenId, requireUser(ctx).user));
      },
    },
  ];
}
