import { CurrentUser, type Session } from '@earmark/contracts';
import { describe, expect, it } from 'vitest';
import { apiRequest } from '@/lib/api-client';
import { ApiError } from '@/lib/api-error';
import { sessionStore } from '@/lib/session-store';
import { json, mockApi, problem, qaUser, seedSession } from './mock-api';

const renewed: Session = { accessToken: 'access-2', expiresIn: 900, refreshToken: 'refresh-2', user: qaUser };

function signedIn() {
  seedSession('access-1', 'refresh-1');
  sessionStore.reload();
}

describe('api client', () => {
  it('refreshes once on 401 and retries with the new access token', async () => {
    signedIn();
    const api = mockApi({
      'GET /api/me': (request) =>
        request.authorization === 'Bearer access-2' ? json(qaUser) : problem(401, 'Unauthorized', 'Token expired.'),
      'POST /api/auth/refresh': () => json(renewed),
    });

    const me = await apiRequest('/api/me', { schema: CurrentUser });

    expect(me.displayName).toBe('Quinn Abara');
    expect(api.requests.map((r) => `${r.method} ${r.path} ${r.authorization ?? '-'}`)).toEqual([
      'GET /api/me Bearer access-1',
      'POST /api/auth/refresh -',
      'GET /api/me Bearer access-2',
    ]);
    expect(api.requests[1]?.body).toEqual({ refreshToken: 'refresh-1' });
    expect(sessionStore.getTokens()).toEqual({ accessToken: 'access-2', refreshToken: 'refresh-2' });
    expect(JSON.parse(window.localStorage.getItem('earmark.session') ?? 'null')).toEqual({
      accessToken: 'access-2',
      refreshToken: 'refresh-2',
    });
  });

  it('shares one refresh between requests that fail together', async () => {
    signedIn();
    const api = mockApi({
      'GET /api/me': (request) => (request.authorization === 'Bearer access-2' ? json(qaUser) : problem(401, 'Unauthorized')),
      'POST /api/auth/refresh': () => json(renewed),
    });

    await Promise.all([
      apiRequest('/api/me', { schema: CurrentUser }),
      apiRequest('/api/me', { schema: CurrentUser }),
      apiRequest('/api/me', { schema: CurrentUser }),
    ]);

    expect(api.requests.filter((r) => r.path === '/api/auth/refresh')).toHaveLength(1);
  });

  it('signs out when the refresh is refused', async () => {
    signedIn();
    const api = mockApi({
      'GET /api/me': () => problem(401, 'Unauthorized'),
      'POST /api/auth/refresh': () => problem(401, 'Unauthorized', 'Refresh token expired.'),
    });

    const error = await apiRequest('/api/me', { schema: CurrentUser }).catch((e: unknown) => e);

    expect(error).toBeInstanceOf(ApiError);
    expect((error as ApiError).status).toBe(401);
    expect(sessionStore.getState()).toEqual({ tokens: null, endReason: 'expired' });
    expect(window.localStorage.getItem('earmark.session')).toBeNull();
    expect(api.requests.map((r) => r.path)).toEqual(['/api/me', '/api/auth/refresh']);
  });

  it('does not refresh a second time when the renewed token is refused too', async () => {
    signedIn();
    const api = mockApi({
      'GET /api/me': () => problem(401, 'Unauthorized'),
      'POST /api/auth/refresh': () => json(renewed),
    });

    await expect(apiRequest('/api/me', { schema: CurrentUser })).rejects.toBeInstanceOf(ApiError);
    expect(api.requests.map((r) => r.path)).toEqual(['/api/me', '/api/auth/refresh', '/api/me']);
    expect(sessionStore.getTokens()).toBeNull();
  });

  it('turns problem+json into an ApiError with title, detail and field errors', async () => {
    signedIn();
    mockApi({
      'POST /api/projects': () =>
        new Response(
          JSON.stringify({
            type: 'https://earmark.dev/problems/validation',
            title: 'Invalid request',
            status: 400,
            detail: 'One field is wrong.',
            errors: [{ path: 'key', message: 'lower-case letters, digits and dashes' }],
          }),
          { status: 400, headers: { 'Content-Type': 'application/problem+json' } },
        ),
    });

    const error = await apiRequest('/api/projects', { method: 'POST', body: { key: 'Bad Key' } }).catch(
      (e: unknown) => e,
    );

    expect(error).toBeInstanceOf(ApiError);
    const apiError = error as ApiError;
    expect([apiError.status, apiError.title, apiError.detail]).toEqual([400, 'Invalid request', 'One field is wrong.']);
    expect(apiError.fieldErrors).toEqual([{ path: 'key', message: 'lower-case letters, digits and dashes' }]);
    expect(sessionStore.getTokens()).not.toBeNull();
  });

  it('rejects a success body that breaks the contract', async () => {
    signedIn();
    mockApi({ 'GET /api/me': () => json({ id: 'u1', email: 'x@y.test' }) });

    const error = await apiRequest('/api/me', { schema: CurrentUser }).catch((e: unknown) => e);

    expect(error).toBeInstanceOf(ApiError);
    expect((error as ApiError).kind).toBe('invalid-response');
  });

  it('reports an unreachable API without signing out', async () => {
    signedIn();
    mockApi({ 'GET /api/me': () => Promise.reject(new TypeError('fetch failed')) });

    const error = await apiRequest('/api/me', { schema: CurrentUser }).catch((e: unknown) => e);

    expect((error as ApiError).kind).toBe('network');
    expect((error as ApiError).title).toBe('Cannot reach Earmark');
    expect(sessionStore.getTokens()).not.toBeNull();
  });
});
