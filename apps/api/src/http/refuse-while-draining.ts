import type { Lifecycle } from '@earmark/platform';
import type { RequestHandler } from 'express';
import { sendProblem, typeFor } from './problem.js';

/**
 * After SIGTERM the server accepts no new connections, but a client may still send a new request
 * on a kept-alive one: it gets 503 with Retry-After and `Connection: close`, so it retries on
 * another API process, while requests already in flight finish. Liveness stays 200 (the process
 * is healthy, only leaving).
 */
export function refuseWhileDraining(lifecycle: Lifecycle): RequestHandler {
  return (req, res, next) => {
    if (!lifecycle.draining || req.path === '/api/health/live') return next();
    res.setHeader('Connection', 'close');
    res.setHeader('Retry-After', '2');
    sendProblem(res, { type: typeFor(503), title: 'Shutting down', status: 503, detail: 'This API process is shutting down; retry the request (another process will answer).', instance: req.originalUrl });
  };
}
