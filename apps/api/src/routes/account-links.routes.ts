import { AccountLinkInfo, AccountLinkSecret, SetPasswordWithLinkRequest } from '@earmark/contracts';
import type { UserAdminService } from '@earmark/domain';
import { z } from 'zod';
import { route, type RouteDef } from '../http/route.js';

const SecretParams = z.object({ secret: AccountLinkSecret });

/** The page a mailed invitation or password-reset link opens: anyone holding the link's secret. */
export function accountLinkRoutes(users: UserAdminService): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/api/account-links/:secret',
      access: { kind: 'public' },
      summary: 'Who a one-time invitation or password-reset link is for, while it works (410 saying why once used or expired)',
      params: SecretParams,
      response: AccountLinkInfo,
      async handle(ctx) {
        ctx.res.json(await users.describeLink(ctx.em, ctx.params.secret));
      },
    }),
    route({
      method: 'post',
      path: '/api/account-links/:secret',
      access: { kind: 'public' },
      summary: 'Choose a password with a one-time link; the link is spent and any earlier session ends',
      params: SecretParams,
      body: SetPasswordWithLinkRequest,
      status: 204,
      async handle(ctx) {
        await users.redeemLink(ctx.em, ctx.params.secret, ctx.body.password);
        ctx.res.status(204).end();
      },
    }),
  ];
}
