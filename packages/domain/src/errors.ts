/**
 * Domain errors: what went wrong in the gate's terms, with no transport attached. The HTTP
 * edge maps each kind to a status and problem+json (apps/api/src/http/problem.ts); the worker
 * records them on a verdict or logs them.
 */
export type DomainErrorKind = 'not_found' | 'forbidden' | 'conflict' | 'invalid' | 'unsupported_capture' | 'unavailable' | 'gone' | 'quota_exceeded';

export interface FieldError {
  path: string;
  message: string;
}

/** An entity a conflict refers to: its kind, id and state, never shown raw (clients turn it into a link). */
export interface ExistingEntity {
  kind: 'waiver';
  id: string;
  state: string;
}

export abstract class DomainError extends Error {
  abstract readonly kind: DomainErrorKind;
  /** A stable machine-readable reason (`sample-rate-mismatch`), where clients branch on it. */
  readonly code?: string;
  readonly fieldErrors: FieldError[];
  /** The thing that stands in the way (the waiver already requested), so a client can link to it. */
  readonly existing?: ExistingEntity;

  constructor(detail: string, options: { code?: string; fieldErrors?: FieldError[]; existing?: ExistingEntity } = {}) {
    super(detail);
    this.name = new.target.name;
    this.code = options.code;
    this.fieldErrors = options.fieldErrors ?? [];
    this.existing = options.existing;
  }
}

/** The thing asked for does not exist (or is not visible to the caller). */
export class NotFoundError extends DomainError {
  readonly kind = 'not_found';
}

/** A rule of the gate forbids this actor this act (four-eyes, author-only edits). */
export class ForbiddenError extends DomainError {
  readonly kind = 'forbidden';
  constructor(detail = 'Your role does not allow this.', options: { code?: string } = {}) {
    super(detail, options);
  }
}

/** The act does not fit the current state (a submitted revision edited, a key reused). */
export class ConflictError extends DomainError {
  readonly kind = 'conflict';
}

/** Input that breaks a rule, naming every failing field. */
export class ValidationError extends DomainError {
  readonly kind = 'invalid';
  constructor(detail: string, fieldErrors: FieldError[] = [], code?: string) {
    super(detail, { fieldErrors, code });
  }
}

/** The upload is not a capture Earmark can judge (format, channels, rate, samples). */
export class UnsupportedCaptureError extends DomainError {
  readonly kind = 'unsupported_capture';
  constructor(detail: string, code: string) {
    super(detail, { code });
  }
}

/** It existed, but what was asked for was removed for good (capture audio purged by the retention policy). */
export class GoneError extends DomainError {
  readonly kind = 'gone';
  constructor(detail: string, code: string) {
    super(detail, { code });
  }
}

/** Storing this would take the project past its storage quota; nothing was stored. */
export class QuotaExceededError extends DomainError {
  readonly kind = 'quota_exceeded';
  constructor(detail: string, code: string) {
    super(detail, { code });
  }
}

/** A dependency (object store, queue) is down; the caller should retry. */
export class ServiceUnavailableError extends DomainError {
  readonly kind = 'unavailable';
  constructor(
    detail: string,
    readonly retryAfterSeconds = 5,
  ) {
    super(detail);
  }
}
