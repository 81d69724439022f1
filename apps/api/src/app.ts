import fs from 'node:fs';
import path from 'node:path';
import { RequestContext } from '@mikro-orm/postgresql';
import express from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import { createTokenSigner } from './auth/jwt.js';
import type { ApiEnv } from './env.js';
import { mountRoutes } from './http/mount-routes.js';
import { errorHandler, notFoundHandler, sendProblem } from './http/problem.js';
import type { RouteDef } from './http/route.js';
import type { ApiRuntime } from './runtime.js';
import { docsRoutes } from './routes/docs.routes.js';
import { allRoutes } from './routes/index.js';
import { SessionService } from './auth/session.service.js';

export interface EarmarkApp {
  app: express.Express;
  routes: RouteDef[];
}

function loginLimiter(env: ApiEnv): express.RequestHandler {
  return rateLimit({
    windowMs: 15 * 60 * 1000,
    limit: env.EARMARK_LOGIN_RATE_LIMIT,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    // Only failed attempts count, so a team signing in all day is never locked out.
    skipSuccessfulRequests: true,
    // Per address and account, so one noisy client cannot lock out everyone else.
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${String((req.body as { email?: unknown } | undefined)?.email ?? '').toLowerCase()}`,
    handler: (req, res) =>
      sendProblem(
        res,
        { type: 'https://earmark.dev/problems/429', title: 'Too many sign-in attempts', status: 429, detail: 'Wait a few minutes before trying again.', instance: req.originalUrl },
      ),
  });
}

/** Builds the Express app; tests boot it on an ephemeral port. */
export function createApp({ orm, env, logger, gate }: ApiRuntime): EarmarkApp {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
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
  const routes: RouteDef[] = allRoutes({ gate, sessions: new SessionService(signer), loginLimiter: loginLimiter(env), maxCaptureBytes: env.EARMARK_MAX_CAPTURE_BYTES });
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
