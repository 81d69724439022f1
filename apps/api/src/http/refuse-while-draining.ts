import type { Lifecycle } from '@earmark/platform';
import type { RequestHandler } from 'express';
import { sendProblem, typeFor } from './problem.js';

const PROBES = new Set(['/api/health/live', '/api/health/ready']);

/**
 * After SIGTERM the server accepts no new connections, but a client may still send a new request
 * on a kept-alive one: it gets 503 with Retry-After and `Connection: close`, so it retries on
 * another API process, while requests already in flight finish. The probes answer for themselves:
 * liveness stays 200 (the process is healthy, only leaving), readiness says it is draining.
 */
export function refuseWhileDraining(lifecycle: Lifecycle): RequestHandler {
  return (req, res, next) => {
    if (!lifecycle.draining || PROBES.has(req.path)) return next();
    res.setHeader('Connection', 'close');
    res.setHeader('Retry-After', '2');
    sendProblem(res, { type: typeFor(503), title: 'Shutting down', status: 503, detail: 'This API process is shutting down; retry the request (another process will answer).', instance: req.originalUrl });
  };
}
