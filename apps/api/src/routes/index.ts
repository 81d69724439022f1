import type { RequestHandler } from 'express';
import type PgBoss from 'pg-boss';
import type { RouteDef } from '../http/route.js';
import type { CaptureIngestService } from '../services/capture-ingest.service.js';
import type { CaptureViewService } from '../services/capture-view.service.js';
import type { FindingsService } from '../services/findings.service.js';
import { CatalogService } from '../services/catalog.service.js';
import type { Links } from '../services/links.js';
import { MaskService } from '../services/mask.service.js';
import { ProjectService } from '../services/project.service.js';
import type { SessionService } from '../services/session.service.js';
import { TokenService } from '../services/token.service.js';
import { adminRoutes } from './admin.routes.js';
import { authRoutes } from './auth.routes.js';
import { catalogRoutes } from './catalog.routes.js';
import { ciBuildRoutes } from './ci-builds.routes.js';
import { ciCaptureRoutes } from './ci-captures.routes.js';
import { dashboardRoutes } from './dashboard.routes.js';
import { healthRoutes } from './health.routes.js';
import { maskRoutes } from './masks.routes.js';
import { maskDerivationRoutes } from './mask-derivation.routes.js';
import { maskWorkflowRoutes } from './mask-workflow.routes.js';
import { projectRoutes } from './projects.routes.js';
import { tokenRoutes } from './tokens.routes.js';

export interface RouteDeps {
  sessions: SessionService;
  loginLimiter: RequestHandler;
  ingest: CaptureIngestService;
  views: CaptureViewService;
  findings: FindingsService;
  links: Links;
  /** Producer side of the job queue (impact runs, re-evaluation). */
  boss: PgBoss;
}

/** Every API route; the app mounts exactly these, and the role test walks them all. */
export function allRoutes(deps: RouteDeps): RouteDef[] {
  const catalog = new CatalogService();
  return [
    ...healthRoutes(),
    ...authRoutes(deps.sessions, deps.loginLimiter),
    ...projectRoutes(new ProjectService()),
    ...tokenRoutes(new TokenService()),
    ...catalogRoutes(catalog),
    ...maskRoutes(new MaskService(), catalog),
    ...maskWorkflowRoutes(catalog, deps),
    ...maskDerivationRoutes(deps),
    ...adminRoutes(),
    ...dashboardRoutes(deps.views, deps.findings),
    ...ciBuildRoutes(deps.links),
    ...ciCaptureRoutes(deps.ingest, deps.links),
  ];
}
