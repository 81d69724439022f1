import type { ErrorRequestHandler, RequestHandler, Response } from 'express';
import type { Logger } from 'pino';
import { PROBLEM_CONTENT_TYPE, type Problem } from '@earmark/contracts';
import { DomainError, ServiceUnavailableError, type DomainErrorKind } from '@earmark/domain';
import { ComputePoolBusyError, ComputeTaskError, ComputeThreadError } from '@earmark/platform';
import { HttpError } from '../errors.js';
import { DATABASE_RETRY_AFTER_S, isDatabaseUnavailable } from './database-unavailable.js';

/** Seconds a client waits before retrying work refused because every compute thread is busy. */
const BUSY_RETRY_AFTER_S = 2;

/** How each kind of domain error reads over HTTP: the only place that knows. */
const DOMAIN_STATUS: Record<DomainErrorKind, { status: number; title: string }> = {
  not_found: { status: 404, title: 'Not found' },
  forbidden: { status: 403, title: 'Forbidden' },
  conflict: { status: 409, title: 'Conflict' },
  invalid: { status: 422, title: 'Invalid request' },
  unsupported_capture: { status: 422, title: 'Unsupported capture' },
  unavailable: { status: 503, title: 'Service unavailable' },
  gone: { status: 410, title: 'Gone' },
  quota_exceeded: { status: 413, title: 'Storage quota exceeded' },
};

/** Kinds whose problem `type` names the reason (`…/problems/capture-purged`) rather than the status: clients branch on it. */
const TYPED_BY_CODE = new Set<DomainErrorKind>(['gone', 'quota_exceeded']);

export const typeFor = (status: number | string) => `https://earmark.dev/problems/${status}`;

export function sendProblem(res: Response, problem: Problem, headers: Record<string, string> = {}): void {
  for (const [k, v] of Object.entries(headers)) res.setHeader(k, v);
  res.status(problem.status).type(PROBLEM_CONTENT_TYPE).send(JSON.stringify(problem));
}

/** Unknown routes under /api answer 404 problem+json, not an HTML page. */
export const notFoundHandler: RequestHandler = (req, res) => {
  sendProblem(res, {
    type: typeFor(404),
    title: 'Not found',
    status: 404,
    detail: `No route for ${req.method} ${req.path}`,
    instance: req.originalUrl,
  });
};

interface BodyParserError {
  type?: string;
  status?: number;
  expose?: boolean;
  message?: string;
}

/** The one error handler: domain errors → their status; parser errors → 400/413; the rest → generic 500. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (err: unknown, req, res, _next) => {
    if (res.headersSent) {
      logger.error({ err }, 'error after headers were sent');
      return;
    }
    if (err instanceof DomainError) {
      const { status, title } = DOMAIN_STATUS[err.kind];
      const headers: Record<string, string> = err instanceof ServiceUnavailableError ? { 'Retry-After': String(err.retryAfterSeconds) } : {};
      sendProblem(
        res,
        { type: TYPED_BY_CODE.has(err.kind) && err.code ? typeFor(err.code) : typeFor(status), title, status, detail: err.message, instance: req.originalUrl, ...(err.fieldErrors.length ? { errors: err.fieldErrors } : {}), ...(err.code ? { code: err.code } : {}), ...(err.existing ? { existing: err.existing } : {}) },
        headers,
      );
      return;
    }
    if (err instanceof HttpError) {
      sendProblem(
        res,
        { type: typeFor(err.status), title: err.title, status: err.status, detail: err.message, instance: req.originalUrl, ...(err.extra.errors ? { errors: err.extra.errors } : {}), ...(err.extra.code ? { code: err.extra.code } : {}) },
        err.extra.headers,
      );
      return;
    }
    if (err instanceof ComputePoolBusyError) {
      sendProblem(
        res,
        { type: typeFor(503), title: 'Busy', status: 503, detail: 'Every compute thread is busy and the queue is full; retry shortly.', instance: req.originalUrl },
        { 'Retry-After': String(BUSY_RETRY_AFTER_S) },
      );
      return;
    }
    if (err instanceof ComputeTaskError && err.taskErrorName === 'AudioDecodeError') {
      const code = typeof err.props.code === 'string' ? err.props.code : undefined;
      sendProblem(res, { type: typeFor(422), title: DOMAIN_STATUS.unsupported_capture.title, status: 422, detail: err.message, instance: req.originalUrl, ...(code ? { code } : {}) });
      return;
    }
    if (err instanceof ComputeThreadError) {
      logger.error({ err, method: req.method, url: req.originalUrl }, 'compute thread stopped');
      sendProblem(res, {
        type: typeFor(500),
        title: 'Computation failed',
        status: 500,
        detail: 'The computation for this request stopped (it needed more memory than a compute thread may use); the server itself is fine.',
        instance: req.originalUrl,
      });
      return;
    }
    const parserError = err as BodyParserError;
    if (parserError.type === 'entity.parse.failed') {
      sendProblem(res, { type: typeFor(400), title: 'Malformed JSON', status: 400, detail: 'The request body is not valid JSON.', instance: req.originalUrl });
      return;
    }
    if (parserError.type === 'entity.too.large') {
      sendProblem(res, { type: typeFor(413), title: 'Body too large', status: 413, detail: 'The request body is larger than this route accepts.', instance: req.originalUrl });
      return;
    }
    if (parserError.expose && parserError.status && parserError.status < 500) {
      sendProblem(res, { type: typeFor(parserError.status), title: 'Bad request', status: parserError.status, detail: parserError.message ?? 'Bad request', instance: req.originalUrl });
      return;
    }
    if (isDatabaseUnavailable(err)) {
      logger.warn({ err, method: req.method, url: req.originalUrl }, 'database unavailable');
      sendProblem(
        res,
        { type: typeFor(503), title: 'Service unavailable', status: 503, detail: 'The database cannot be reached right now. Retry shortly (an upload with the same Idempotency-Key is stored once).', instance: req.originalUrl },
        { 'Retry-After': String(DATABASE_RETRY_AFTER_S) },
      );
      return;
    }
    logger.error({ err, method: req.method, url: req.originalUrl }, 'unhandled error');
    sendProblem(res, { type: typeFor(500), title: 'Internal error', status: 500, detail: 'Something went wrong on our side; it has been logged.', instance: req.originalUrl });
  };
}
