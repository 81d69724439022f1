/**
 * Errors of the HTTP edge itself (authentication, body size, media type). The gate's own
 * errors are the domain's (`@earmark/domain`); problem.ts maps both to problem+json.
 */
export { ConflictError, ForbiddenError, NotFoundError, ServiceUnavailableError, UnsupportedCaptureError, ValidationError } from '@earmark/domain';

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly title: string,
    detail: string,
    readonly extra: { errors?: { path: string; message: string }[]; headers?: Record<string, string>; code?: string } = {},
  ) {
    super(detail);
  }
}

export class AuthError extends HttpError {
  /** `code` (e.g. `token-expired`) lets a client tell a refusal it can explain from a generic one. */
  constructor(detail = 'Sign in, or send a valid bearer token.', code?: string) {
    super(401, 'Not authenticated', detail, { headers: { 'WWW-Authenticate': 'Bearer' }, ...(code ? { code } : {}) });
  }
}

export class BadRequestError extends HttpError {
  constructor(detail: string) {
    super(400, 'Bad request', detail);
  }
}

export class UnsupportedMediaTypeError extends HttpError {
  constructor(detail: string) {
    super(415, 'Unsupported media type', detail);
  }
}

export class PayloadTooLargeError extends HttpError {
  constructor(limitBytes: number) {
    super(413, 'Capture too large', `Captures may be at most ${limitBytes} bytes (${(limitBytes / 1048576).toFixed(0)} MiB).`, {
      headers: { Connection: 'close' },
    });
  }
}
