import type { Request, RequestHandler } from 'express';
import type { ApiMetrics } from './api-metrics.js';

/**
 * The label for a request's route: the template of the route that answered it (never the URL,
 * which holds ids and would make a series per capture), `web` for the dashboard's files and
 * client-side routes, and `unmatched` for anything else (an unknown /api path, a body the JSON
 * parser refused before routing).
 */
export function routeLabel(req: Request, status: number): string {
  const template: unknown = (req.route as { path?: unknown } | undefined)?.path;
  if (typeof template === 'string') return template;
  const path = req.originalUrl.split('?')[0] ?? '';
  if (path !== '/api' && !path.startsWith('/api/') && status < 400) return 'web';
  return 'unmatched';
}

/** Counts and times every request once its answer is done (or the client gave up on it). */
export function requestMetrics(metrics: Pick<ApiMetrics, 'httpRequests' | 'httpDuration'>): RequestHandler {
  return (req, res, next) => {
    const started = process.hrtime.bigint();
    res.once('close', () => {
      const route = routeLabel(req, res.statusCode);
      const method = req.method;
      metrics.httpRequests.inc({ method, route, status: String(res.statusCode) });
      metrics.httpDuration.observe({ method, route }, Number(process.hrtime.bigint() - started) / 1e9);
    });
    next();
  };
}
