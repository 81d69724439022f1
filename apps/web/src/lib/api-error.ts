import { Problem } from '@earmark/contracts';

/**
 * What went wrong talking to the API:
 * - `http`: the API answered with an error status (its problem+json, or one we made up
 *   when the body was not problem+json, e.g. from a proxy);
 * - `network`: no answer at all (offline, API down, aborted);
 * - `invalid-response`: a 2xx whose body does not match the contract, which means the web
 *   app and the API disagree and nobody should act on the data.
 */
export type ApiErrorKind = 'http' | 'network' | 'invalid-response';

export type FieldProblem = { path: string; message: string };

export class ApiError extends Error {
  override readonly name = 'ApiError';
  readonly kind: ApiErrorKind;
  readonly status: number;
  readonly title: string;
  readonly detail: string | undefined;
  readonly type: string;
  readonly fieldErrors: readonly FieldProblem[];
  /** What a conflict refers to (the waiver already requested), for a link; never shown raw. */
  readonly existing: Problem['existing'];

  constructor(init: {
    kind: ApiErrorKind;
    status: number;
    title: string;
    detail?: string | undefined;
    type?: string;
    fieldErrors?: readonly FieldProblem[];
    existing?: Problem['existing'];
  }) {
    super(init.detail ? `${init.title}: ${init.detail}` : init.title);
    this.kind = init.kind;
    this.status = init.status;
    this.title = init.title;
    this.detail = init.detail;
    this.type = init.type ?? 'about:blank';
    this.fieldErrors = init.fieldErrors ?? [];
    this.existing = init.existing;
  }

  get isUnauthorized(): boolean {
    return this.kind === 'http' && this.status === 401;
  }

  get isNotFound(): boolean {
    return this.kind === 'http' && this.status === 404;
  }

  /** Turns a non-2xx response into an ApiError, keeping the API's own wording when it sent some. */
  static async fromResponse(response: Response): Promise<ApiError> {
    const contentType = response.headers.get('content-type') ?? '';
    if (contentType.includes('json')) {
      const body: unknown = await response.json().catch(() => undefined);
      const parsed = Problem.safeParse(body);
      if (parsed.success) {
        return new ApiError({
          kind: 'http',
          status: response.status,
          title: parsed.data.title,
          detail: parsed.data.detail,
          type: parsed.data.type,
          fieldErrors: parsed.data.errors ?? [],
          existing: parsed.data.existing,
        });
      }
    }
    return new ApiError({
      kind: 'http',
      status: response.status,
      title: fallbackTitle(response.status),
      detail: `The server answered ${response.status}${response.statusText ? ` ${response.statusText}` : ''}.`,
    });
  }

  static network(cause: unknown): ApiError {
    const aborted = cause instanceof DOMException && cause.name === 'AbortError';
    return new ApiError({
      kind: 'network',
      status: 0,
      title: aborted ? 'Request cancelled' : 'Cannot reach Earmark',
      detail: aborted ? undefined : 'Check your connection; the Earmark server may also be restarting.',
    });
  }
}

function fallbackTitle(status: number): string {
  if (status === 401) return 'Not signed in';
  if (status === 403) return 'Not allowed';
  if (status === 404) return 'Not found';
  if (status === 429) return 'Too many requests';
  if (status >= 500) return 'Server error';
  return 'Request failed';
}

export function isApiError(value: unknown): value is ApiError {
  return value instanceof ApiError;
}
