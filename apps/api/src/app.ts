import fs from 'node:fs';
import path from 'node:path';
import { RequestContext } from '@mikro-orm/postgresql';
import express from 'express';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import { createTokenSigner } from './auth/jwt.js';
import { mountRoutes } from './http/mount-routes.js';
import { errorHandler, notFoundHandler } from './http/problem.js';
import type { RouteDef } from './http/route.js';
import type { ApiRuntime } from './runtime.js';
import { docsRoutes } from './routes/docs.routes.js';
import { allRoutes } from './routes/index.js';
import { SessionService } from './auth/session.service.js';
import { passwordChangeGuard, signInGuard } from './auth/sign-in-guard.js';
import { WorkGate } from './auth/work-gate.js';
import { SharedLimitStore } from './auth/shared-limit-store.js';
import { requestMetrics } from './metrics/request-metrics.js';
import { refuseWhileDraining } from './http/refuse-while-draining.js';

export interface EarmarkApp {
  app: express.Express;
  routes: RouteDef[];
}

/** Builds the Express app; tests boot it on an ephemeral port. */
export function createApp({ orm, env, logger, gate, verdictWaits, limiterPool, passwords, apiMetrics, health, lifecycle }: ApiRuntime): EarmarkApp {
  const app = express();
  // First, so every answer is counted, those of the middleware below included.
  app.use(requestMetrics(apiMetrics));
  app.disable('x-powered-by');
  app.use(refuseWhileDraining(lifecycle));
  // Off unless configured: otherwise any client could pick its own address for the limiters.
  app.set('trust proxy', env.EARMARK_TRUST_PROXY);
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: { 'img-src': ["'self'", 'data:', 'blob:'], 'media-src': ["'self'", 'blob:'], 'worker-src': ["'self'", 'blob:'] },
      },
    }),
  );
  app.use(
    pinoHttp({
      logger,
      // Credentials never reach the log.
      redact: ['req.headers.authorization', 'req.headers.cookie', 'res.headers["set-cookie"]'],
      // One compact line per request: method, URL, status, time. No headers, no bodies.
      serializers: {
        req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
      customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'warn' : 'info'),
    }),
  );
  app.use('/api', express.json({ limit: '1mb' }));
  app.use((_req, _res, next) => RequestContext.create(orm.em, next));

  const signer = createTokenSigner(env.EARMARK_JWT_SECRET, { access: env.EARMARK_ACCESS_TOKEN_TTL_S, refresh: env.EARMARK_REFRESH_TOKEN_TTL_S });
  const limitStores = (name: string) => new SharedLimitStore(limiterPool, `sign-in:${name}`, logger);
  // One gate: sign-ins and password changes share this process's bound on bcrypt work.
  const passwordGate = new WorkGate(env.EARMARK_PASSWORD_WORK_CONCURRENCY, env.EARMARK_PASSWORD_WORK_QUEUE);
  const loginLimiter = signInGuard(env, limitStores, passwordGate);
  const passwordChangeLimiter = passwordChangeGuard(env, limitStores, passwordGate);
  const routes: RouteDef[] = allRoutes({ gate, sessions: new SessionService(signer, passwords), loginLimiter, passwordChangeGuard: passwordChangeLimiter, maxCaptureBytes: env.EARMARK_MAX_CAPTURE_BYTES, verdictWaits, maxConcurrentUploads: env.EARMARK_MAX_CONCURRENT_UPLOADS, uploadMetrics: apiMetrics.uploads, health });
  routes.push(...docsRoutes(() => routes, env.EARMARK_PUBLIC_URL));
  const api = express.Router();
  mountRoutes(api, routes, orm, signer);
  app.use(api);
  app.use('/api', notFoundHandler);

  // The built web app, with client-side routes falling back to index.html.
  const indexHtml = path.join(env.EARMARK_WEB_DIST, 'index.html');
  if (fs.existsSync(indexHtml)) {
    app.use(express.static(env.EARMARK_WEB_DIST, { index: false, maxAge: '1h' }));
    app.get(/^(?!\/api\/).*/, (_req, res) => res.sendFile(indexHtml));
  }
  app.use(notFoundHandler);
  app.use(errorHandler(logger));
  return { app, routes };
}
