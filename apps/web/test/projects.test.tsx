import { screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { heron, json, kestrel, mockApi, problem, qaUser, seedSession } from './mock-api';
import { renderApp } from './render-app';

describe('projects page', () => {
  it('renders one row per project from the API, with the role and counts', async () => {
    seedSession('access-1');
    const api = mockApi({
      'GET /api/me': () => json(qaUser),
      'GET /api/projects': () => json({ items: [kestrel, heron] }),
    });
    renderApp('/projects');

    expect(await screen.findByRole('heading', { name: 'Projects' })).toBeTruthy();
    const table = screen.getByRole('table');
    const rows = within(table).getAllByRole('row').slice(1);
    // Sorted by name: Heron before Kestrel.
    expect(rows.map((row) => row.getAttribute('data-project-key'))).toEqual(['heron-bar', 'kestrel-buds']);

    const kestrelRow = rows[1]!;
    // A project opens on its overview, the landing page that says whether main is green.
    expect(within(kestrelRow).getByRole('link', { name: 'Kestrel Buds' }).getAttribute('href')).toBe('/projects/kestrel-buds');
    expect(within(kestrelRow).getByText('kestrel-buds')).toBeTruthy();
    expect(within(kestrelRow).getByText('QA manager')).toBeTruthy();
    expect(within(kestrelRow).getByText('212')).toBeTruthy();
    expect(within(kestrelRow).getByText('14')).toBeTruthy();
    expect(within(rows[0]!).getByText('Viewer')).toBeTruthy();

    // Every API call carried the stored access token.
    expect(api.requests.length).toBeGreaterThan(0);
    expect(api.requests.every((r) => r.authorization === 'Bearer access-1')).toBe(true);
  });

  it('says so when the user has no projects', async () => {
    seedSession();
    mockApi({
      'GET /api/me': () => json({ ...qaUser, memberships: [] }),
      'GET /api/projects': () => json({ items: [] }),
    });
    renderApp('/projects');

    expect(await screen.findByText('No projects yet')).toBeTruthy();
    expect(screen.getByText(/Ask an Earmark administrator to add you/)).toBeTruthy();
    expect(screen.queryByRole('table')).toBeNull();
  });

  it('shows the problem the API reported, inside the shell', async () => {
    seedSession();
    mockApi({
      'GET /api/me': () => json(qaUser),
      'GET /api/projects': () => problem(503, 'Database unavailable', 'Earmark cannot reach its database right now.'),
    });
    renderApp('/projects');

    const alert = await screen.findByRole('alert');
    expect(alert.textContent).toContain('Database unavailable');
    expect(alert.textContent).toContain('Earmark cannot reach its database right now.');
    expect(screen.getByRole('navigation', { name: 'Main' })).toBeTruthy();
  });

  it('signs out from the user menu', async () => {
    seedSession('access-1');
    const api = mockApi({
      'GET /api/me': () => json(qaUser),
      'GET /api/projects': () => json({ items: [kestrel] }),
      'POST /api/auth/logout': () => new Response(null, { status: 204 }),
    });
    const { router } = renderApp('/projects');
    const user = userEvent.setup();

    await user.click(await screen.findByRole('button', { name: /Quinn Abara/ }));
    const menu = screen.getByRole('menu');
    expect(within(menu).getByText('qa@fernwick.test')).toBeTruthy();
    await user.click(within(menu).getByRole('menuitem', { name: 'Sign out' }));

    expect(await screen.findByRole('button', { name: 'Sign in' })).toBeTruthy();
    expect(router.state.location.pathname).toBe('/sign-in');
    expect(window.localStorage.getItem('earmark.session')).toBeNull();
    const logout = api.requests.find((r) => r.path === '/api/auth/logout');
    expect(logout?.authorization).toBe('Bearer access-1');
  });
});
