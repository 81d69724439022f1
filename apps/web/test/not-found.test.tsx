import { screen } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { json, kestrel, mockApi, problem, qaUser, seedSession } from './mock-api';
import { renderApp } from './render-app';

describe('not-found and session start-up', () => {
  it('shows a not-found page inside the shell for an unknown address', async () => {
    seedSession();
    mockApi({ 'GET /api/me': () => json(qaUser) });
    renderApp('/no/such/page');

    expect(await screen.findByRole('heading', { name: 'Page not found' })).toBeTruthy();
    expect(screen.getByText('/no/such/page')).toBeTruthy();
    expect(screen.getByRole('link', { name: 'Back to projects' }).getAttribute('href')).toBe('/projects');
    expect(screen.getByRole('navigation', { name: 'Main' })).toBeTruthy();
  });

  it("uses the API's words for a project that does not exist", async () => {
    seedSession();
    mockApi({
      'GET /api/me': () => json(qaUser),
      'GET /api/projects/osprey': () => problem(404, 'Project not found', 'There is no project "osprey" you can see.'),
    });
    renderApp('/projects/osprey');

    expect(await screen.findByRole('heading', { name: 'Project not found' })).toBeTruthy();
    expect(screen.getByText('There is no project "osprey" you can see.')).toBeTruthy();
  });

  it('checks a stored session on start-up and returns to sign-in when it is no longer valid', async () => {
    seedSession('stale', 'stale-refresh');
    const api = mockApi({
      'GET /api/me': () => problem(401, 'Unauthorized'),
      'GET /api/projects': () => json({ items: [kestrel] }),
      'POST /api/auth/refresh': () => problem(401, 'Unauthorized', 'Refresh token revoked.'),
    });
    const { router } = renderApp('/projects');

    expect(await screen.findByRole('button', { name: 'Sign in' })).toBeTruthy();
    expect(screen.getByRole('status').textContent).toContain('Your session ended');
    expect(router.state.location.pathname).toBe('/sign-in');
    expect(window.localStorage.getItem('earmark.session')).toBeNull();
    expect(api.requests.some((r) => r.path === '/api/me')).toBe(true);
  });
});
