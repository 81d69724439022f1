import { PROBLEM_CONTENT_TYPE, Session } from '@earmark/contracts';
import type { z } from 'zod';
import { ApiError } from './api-error';
import { sessionStore, type SessionTokens } from './session-store';

/**
 * The one way the web app talks to the API. It attaches the bearer token, refreshes the
 * session once when the API says 401, signs out when that refresh is refused, turns error
 * bodies into ApiError and validates every success body against the shared contracts, so
 * components never see data the API did not promise.
 */

type HttpMethod = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

export type ApiRequestOptions = {
  method?: HttpMethod;
  body?: unknown;
  signal?: AbortSignal;
  /** Send the bearer token and refresh on 401. Off for sign-in and refresh themselves. */
  auth?: boolean;
};

export function apiRequest<T>(
  path: string,
  options: ApiRequestOptions & { schema: z.ZodType<T> },
): Promise<T>;
export function apiRequest(path: string, options?: ApiRequestOptions): Promise<void>;
export async function apiRequest<T>(
  path: string,
  options: ApiRequestOptions & { schema?: z.ZodType<T> } = {},
): Promise<T | void> {
  const { schema, auth = true } = options;
  const tokens = auth ? sessionStore.getTokens() : null;
  let response = await send(path, options, tokens?.accessToken);

  if (auth && response.status === 401 && tokens) {
    const renewed = await renewAfter401(tokens);
    if (!renewed) throw await sessionEnded(response);
    response = await send(path, options, renewed.accessToken);
    // A fresh token that is refused straight away will not get better by refreshing again.
    if (response.status === 401) throw await sessionEnded(response);
  }

  if (!response.ok) throw await ApiError.fromResponse(response);
  if (!schema) return;
  return parseBody(response, schema);
}

async function send(path: string, options: ApiRequestOptions, accessToken: string | undefined): Promise<Response> {
  const headers = new Headers({ Accept: `application/json, ${PROBLEM_CONTENT_TYPE}` });
  if (options.body !== undefined) headers.set('Content-Type', 'application/json');
  if (accessToken) headers.set('Authorization', `Bearer ${accessToken}`);
  try {
    return await fetch(path, {
      method: options.method ?? 'GET',
      headers,
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
      signal: options.signal,
      credentials: 'same-origin',
    });
  } catch (cause) {
    throw ApiError.network(cause);
  }
}

async function parseBody<T>(response: Response, schema: z.ZodType<T>): Promise<T> {
  const body: unknown = await response.json().catch(() => undefined);
  const parsed = schema.safeParse(body);
  if (parsed.success) return parsed.data;
  const first = parsed.error.issues[0];
  throw new ApiError({
    kind: 'invalid-response',
    status: response.status,
    title: 'Unexpected answer from the server',
    detail: first
      ? `The response did not match what this version of Earmark expects (${first.path.join('.') || 'body'}: ${first.message}). Reload the page; if it persists, the web app and the API are out of step.`
      : 'The response did not match what this version of Earmark expects.',
  });
}

async function sessionEnded(response: Response): Promise<ApiError> {
  sessionStore.clear('expired');
  const error = await ApiError.fromResponse(response);
  return new ApiError({
    kind: 'http',
    status: 401,
    title: 'Session ended',
    detail: error.detail ?? 'Sign in again to continue.',
    type: error.type,
  });
}

// Parallel requests that all hit 401 share one refresh; a refresh token is single-use on
// many servers, so a second concurrent refresh could revoke the first one's result.
let refreshInFlight: Promise<SessionTokens | null> | null = null;

async function renewAfter401(used: SessionTokens): Promise<SessionTokens | null> {
  const current = sessionStore.getTokens();
  if (!current) return null;
  // Someone else already refreshed while this request was on the wire: just retry with theirs.
  if (current.accessToken !== used.accessToken) return current;
  refreshInFlight ??= refreshSession(current).finally(() => {
    refreshInFlight = null;
  });
  return refreshInFlight;
}

async function refreshSession(tokens: SessionTokens): Promise<SessionTokens | null> {
  // A network failure propagates as an ApiError without clearing the session: being offline
  // is not a reason to sign the user out.
  const response = await send(
    '/api/auth/refresh',
    { method: 'POST', body: { refreshToken: tokens.refreshToken } },
    undefined,
  );
  if (!response.ok) return null;
  const session = await parseBody(response, Session);
  const renewed = { accessToken: session.accessToken, refreshToken: session.refreshToken };
  sessionStore.set(renewed);
  return renewed;
}

/**
 * Like apiRequest, for bodies that are not JSON (WAV audio, downloads): the same bearer
 * token, the same single refresh on 401 and the same problem+json errors, but the body
 * comes back as bytes for the caller to decode.
 */
export async function apiRequestBinary(
  path: string,
  options: { signal?: AbortSignal; accept?: string } = {},
): Promise<ArrayBuffer> {
  const accept = `${options.accept ?? 'application/octet-stream'}, ${PROBLEM_CONTENT_TYPE}`;
  const fetchWith = async (accessToken: string | undefined): Promise<Response> => {
    const headers = new Headers({ Accept: accept });
    if (accessToken) headers.set('Authorization', `Bearer ${accessToken}`);
    try {
      return await fetch(path, { method: 'GET', headers, signal: options.signal, credentials: 'same-origin' });
    } catch (cause) {
      throw ApiError.network(cause);
    }
  };

  const tokens = sessionStore.getTokens();
  let response = await fetchWith(tokens?.accessToken);
  if (response.status === 401 && tokens) {
    const renewed = await renewAfter401(tokens);
    if (!renewed) throw await sessionEnded(response);
    response = await fetchWith(renewed.accessToken);
    if (response.status === 401) throw await sessionEnded(response);
  }
  if (!response.ok) throw await ApiError.fromResponse(response);
  return response.arrayBuffer();
}
