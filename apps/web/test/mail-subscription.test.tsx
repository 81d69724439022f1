import { screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { json, kestrel, mockApi, problem, qaUser, quietOverview, seedSession } from './mock-api';
import { renderApp } from './render-app';

const viewerProject = { ...kestrel, myRole: 'viewer' as const };
const viewer = { ...qaUser, memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'viewer' as const }] };

describe('build-failure mail setting on the project page', () => {
  it('shows the member their current setting and switches it on', async () => {
    seedSession();
    let stored = false;
    const api = mockApi({
      'GET /api/me': () => json(viewer),
      'GET /api/projects/kestrel-buds/overview': () => json(quietOverview),
      'GET /api/projects/kestrel-buds': () => json(viewerProject),
      'GET /api/projects/kestrel-buds/subscription': () => json({ buildFailures: stored }),
      'PUT /api/projects/kestrel-buds/subscription': (r) => {
        stored = (r.body as { buildFailures: boolean }).buildFailures;
        return json({ buildFailures: stored });
      },
    });
    renderApp('/projects/kestrel-buds#mail');

    const section = (await screen.findByRole('heading', { name: 'Build-failure mail' })).closest('section')!;
    expect(section.id).toBe('mail');
    const toggle = await within(section).findByRole('switch', { name: 'Build-failure mail' });
    expect(toggle.getAttribute('aria-checked')).toBe('false');
    expect(within(section).getByText('Off')).toBeTruthy();

    await userEvent.setup().click(toggle);
    await within(section).findByText('On');
    expect(within(section).getByRole('switch').getAttribute('aria-checked')).toBe('true');
    const put = api.requests.filter((r) => r.method === 'PUT');
    expect(put).toEqual([expect.objectContaining({ path: '/api/projects/kestrel-buds/subscription', body: { buildFailures: true } })]);
  });

  it('says what went wrong and keeps the stored value when the change is refused', async () => {
    seedSession();
    mockApi({
      'GET /api/me': () => json(qaUser),
      'GET /api/projects/kestrel-buds/overview': () => json(quietOverview),
      'GET /api/projects/kestrel-buds': () => json(kestrel),
      'GET /api/projects/kestrel-buds/subscription': () => json({ buildFailures: true }),
      'PUT /api/projects/kestrel-buds/subscription': () => problem(503, 'Database unavailable', 'Earmark cannot reach its database right now.'),
    });
    renderApp('/projects/kestrel-buds');
    const toggle = await screen.findByRole('switch', { name: 'Build-failure mail' });
    expect(toggle.getAttribute('aria-checked')).toBe('true');
    await userEvent.setup().click(toggle);
    expect((await screen.findByRole('alert')).textContent).toContain('Database unavailable');
    expect(screen.getByRole('switch').getAttribute('aria-checked')).toBe('true');
  });

  it('tells a global admin who is not a member that no project mail reaches them', async () => {
    seedSession();
    const api = mockApi({
      'GET /api/me': () => json({ ...qaUser, isAdmin: true, memberships: [] }),
      'GET /api/projects/kestrel-buds/overview': () => json(quietOverview),
      'GET /api/projects/kestrel-buds': () => json({ ...kestrel, myRole: 'admin' }),
    });
    renderApp('/projects/kestrel-buds');
    expect(await screen.findByText('You are not a member of this project, so its mail does not reach you.')).toBeTruthy();
    expect(screen.queryByRole('switch')).toBeNull();
    expect(api.requests.some((r) => r.path.endsWith('/subscription'))).toBe(false);
  });
});
