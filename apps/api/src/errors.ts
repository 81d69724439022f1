/** Domain errors; the one error handler maps each to problem+json. */
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
  constructor(detail = 'Sign in, or send a valid bearer token.') {
    super(401, 'Not authenticated', detail, { headers: { 'WWW-Authenticate': 'Bearer' } });
  }
}

export class ForbiddenError extends HttpError {
  constructor(detail = 'Your role does not allow this.') {
    super(403, 'Forbidden', detail);
  }
}

export class NotFoundError extends HttpError {
  constructor(detail: string) {
    super(404, 'Not found', detail);
  }
}

export class ConflictError extends HttpError {
  constructor(detail: string) {
    super(409, 'Conflict', detail);
  }
}

export class ValidationError extends HttpError {
  constructor(detail: string, errors: { path: string; message: string }[] = []) {
    super(422, 'Invalid request', detail, { errors });
  }
}

export class BadRequestError extends HttpError {
  constructor(detail: string) {
    super(400, 'Bad request', detail);
  }
}

/** The upload is not a capture Earmark can read (format, channels, rate, samples). */
export class UnsupportedCaptureError extends HttpError {
  constructor(detail: string, code: string) {
    super(422, 'Unsupported capture', detail, { code });
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

/** A dependency (object store, queue) is down; the client should retry. */
export class ServiceUnavailableError extends HttpError {
  constructor(detail: string, retryAfterSeconds = 5) {
    super(503, 'Service unavailable', detail, { headers: { 'Retry-After': String(retryAfterSeconds) } });
  }
}
