import type { Gate } from '@earmark/domain';
import type { HealthProbes } from '@earmark/platform';
import type { RequestHandler } from 'express';
import type { SessionService } from '../auth/session.service.js';
import type { RouteDef } from '../http/route.js';
import { accountRoutes } from './account.routes.js';
import { accountLinkRoutes } from './account-links.routes.js';
import { adminRoutes } from './admin.routes.js';
import { authRoutes } from './auth.routes.js';
import { catalogRoutes } from './catalog.routes.js';
import { ciBuildRoutes } from './ci-builds.routes.js';
import { ciCaptureRoutes } from './ci-captures.routes.js';
import { dashboardRoutes } from './dashboard.routes.js';
import { overviewRoutes } from './overview.routes.js';
import { healthRoutes } from './health.routes.js';
import { maskRoutes } from './masks.routes.js';
import { maskDerivationRoutes } from './mask-derivation.routes.js';
import { maskWorkflowRoutes } from './mask-workflow.routes.js';
import { projectRoutes } from './projects.routes.js';
import { subscriptionRoutes } from './subscription.routes.js';
import { tokenRoutes } from './tokens.routes.js';
import type { VerdictWaits } from '../waits/verdict-waits.js';
import { UploadSlots } from '../http/upload-slots.js';
import type { UploadMetrics } from '../metrics/api-metrics.js';

export interface RouteDeps {
  gate: Gate;
  sessions: SessionService;
  loginLimiter: RequestHandler;
  /** Failed-attempt limits and a password-work slot in front of a password change. */
  passwordChangeGuard: RequestHandler;
  maxCaptureBytes: number;
  verdictWaits: VerdictWaits;
  /** Capture uploads this process reads at once (EARMARK_MAX_CONCURRENT_UPLOADS). */
  maxConcurrentUploads: number;
  /** Counts capture uploads by outcome (the metrics port). */
  uploadMetrics: UploadMetrics;
  /** Liveness and readiness, also served on the metrics port. */
  health: HealthProbes;
}

/** Every API route; the app mounts exactly these, and the role test walks them all. */
export function allRoutes({ gate, sessions, loginLimiter, passwordChangeGuard, maxCaptureBytes, verdictWaits, maxConcurrentUploads, uploadMetrics, health }: RouteDeps): RouteDef[] {
  return [
    ...healthRoutes(health),
    ...authRoutes(sessions, loginLimiter),
    ...accountRoutes(sessions, passwordChangeGuard),
    ...projectRoutes(gate.projects),
    ...subscriptionRoutes(gate.subscriptions),
    ...tokenRoutes(gate.tokens),
    ...catalogRoutes(gate.catalog, gate.stimuli),
    ...maskRoutes(gate.masks, gate.catalog, gate.jobs),
    ...maskWorkflowRoutes(gate),
    ...maskDerivationRoutes(gate),
    ...adminRoutes(gate),
    ...accountLinkRoutes(gate.users),
    ...dashboardRoutes(gate),
    ...overviewRoutes(),
    ...ciBuildRoutes(gate.links),
    ...ciCaptureRoutes(gate.ingest, gate.links, maxCaptureBytes, verdictWaits, new UploadSlots(maxConcurrentUploads), uploadMetrics),
  ];
}
