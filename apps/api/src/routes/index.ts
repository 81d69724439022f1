import type { RequestHandler } from 'express';
import type { RouteDef } from '../http/route.js';
import type { SessionService } from '../services/session.service.js';
import { ProjectService } from '../services/project.service.js';
import { TokenService } from '../services/token.service.js';
import { adminRoutes } from './admin.routes.js';
import { authRoutes } from './auth.routes.js';
import { ciBuildRoutes } from './ci-builds.routes.js';
import { healthRoutes } from './health.routes.js';
import { projectRoutes } from './projects.routes.js';
import { tokenRoutes } from './tokens.routes.js';

/** Every API route; the app mounts exactly these, and the role test walks them all. */
export function allRoutes(deps: { sessions: SessionService; loginLimiter: RequestHandler }): RouteDef[] {
  return [
    ...healthRoutes(),
    ...authRoutes(deps.sessions, deps.loginLimiter),
    ...projectRoutes(new ProjectService()),
    ...tokenRoutes(new TokenService()),
    ...adminRoutes(),
    ...ciBuildRoutes(),
  ];
}
