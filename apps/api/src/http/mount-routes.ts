import type { MikroORM } from '@mikro-orm/postgresql';
import { parseWith } from '@earmark/domain';
import type { Router } from 'express';
import { authenticate } from '../auth/authenticate.js';
import { authorize } from '../auth/authorize.js';
import { AuthError } from '../errors.js';
import type { TokenSigner } from '../auth/jwt.js';
import type { RouteDef } from './route.js';

/**
 * Mounts route definitions: authenticate → authorize (the permission matrix) → parse the
 * params, query and body with the route's schemas → handler.
 */
export function mountRoutes(router: Router, routes: RouteDef[], orm: MikroORM, signer: TokenSigner): void {
  for (const route of routes) {
    router[route.method](route.path, ...(route.before ?? []), async (req, res) => {
      const em = orm.em.getContext() as typeof orm.em;
      const principal = route.access.kind === 'public' ? null : await authenticate(req, em, signer);
      if (!principal && route.access.kind !== 'public') throw new AuthError();
      const resource = route.resolveProjectKey ? await route.resolveProjectKey(req, em) : undefined;
      const projectKey = resource ? resource.projectKey : typeof req.params.project === 'string' ? req.params.project : undefined;
      const { project } = await authorize(route.access, principal, projectKey, em, resource?.notFoundDetail);
      const params = route.params ? parseWith(route.params, req.params, 'params') : {};
      const query = route.query ? parseWith(route.query, req.query, 'query') : {};
      const body = route.body ? parseWith(route.body, req.body, 'body') : undefined;
      await route.handle({ req, res, em, principal, project, params, query, body });
    });
  }
}
