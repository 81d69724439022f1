import type { Session } from '@earmark/contracts';
import { screen, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { json, kestrel, mockApi, problem, qaUser } from './mock-api';
import { renderApp } from './render-app';

const session: Session = { accessToken: 'access-1', expiresIn: 900, refreshToken: 'refresh-1', user: qaUser };

async function fillAndSubmit(email: string, password: string) {
  const user = userEvent.setup();
  await user.type(await screen.findByLabelText('Email'), email);
  await user.type(screen.getByLabelText('Password'), password);
  await user.click(screen.getByRole('button', { name: 'Sign in' }));
  return user;
}

describe('sign-in page', () => {
  it("shows the API's problem detail when the credentials are refused", async () => {
    const api = mockApi({
      'POST /api/auth/login': () => problem(401, 'Sign-in failed', 'That e-mail and password do not match an account.'),
    });
    renderApp('/sign-in');

    await fillAndSubmit('qa@fernwick.test', 'wrong-password');

    const alert = await screen.findByRole('alert');
    expect(alert.textContent).toContain('Sign-in failed');
    expect(alert.textContent).toContain('That e-mail and password do not match an account.');
    // A refused sign-in is not an expired session: nothing is refreshed or stored.
    expect(api.requests.map((r) => `${r.method} ${r.path}`)).toEqual(['POST /api/auth/login']);
    expect(api.requests[0]?.body).toEqual({ email: 'qa@fernwick.test', password: 'wrong-password' });
    expect(window.localStorage.getItem('earmark.session')).toBeNull();
  });

  it('shows the rate-limit answer in the same place', async () => {
    mockApi({ 'POST /api/auth/login': () => problem(429, 'Too many sign-in attempts', 'Wait a minute before trying again.') });
    renderApp('/sign-in');
    await fillAndSubmit('qa@fernwick.test', 'x');
    expect((await screen.findByRole('alert')).textContent).toContain('Wait a minute before trying again.');
  });

  it('checks the form before asking the API', async () => {
    const api = mockApi({});
    renderApp('/sign-in');
    const user = userEvent.setup();
    await user.type(await screen.findByLabelText('Email'), 'not-an-address');
    await user.click(screen.getByRole('button', { name: 'Sign in' }));

    expect(await screen.findByText('Enter the e-mail address you were invited with.')).toBeTruthy();
    expect(screen.getByText('Enter your password.')).toBeTruthy();
    expect(screen.getByLabelText('Email').getAttribute('aria-invalid')).toBe('true');
    expect(api.requests).toHaveLength(0);
  });

  it('stores the session and opens the projects list', async () => {
    const api = mockApi({
      'POST /api/auth/login': () => json(session),
      'GET /api/projects': () => json({ items: [kestrel] }),
    });
    renderApp('/sign-in');
    await fillAndSubmit('qa@fernwick.test', 'correct-horse');

    expect(await screen.findByRole('heading', { name: 'Projects' })).toBeTruthy();
    expect(JSON.parse(window.localStorage.getItem('earmark.session') ?? 'null')).toEqual({
      accessToken: 'access-1',
      refreshToken: 'refresh-1',
    });
    // The session carried the user, so /api/me is not asked again straight away.
    expect(api.requests.some((r) => r.path === '/api/me')).toBe(false);
    const menuButton = screen.getByRole('button', { name: /Quinn Abara/ });
    expect(within(menuButton).getByText('QA manager')).toBeTruthy();
  });

  it('sends a visitor without a session to sign-in and back to where they were going', async () => {
    mockApi({
      'POST /api/auth/login': () => json(session),
      'GET /api/projects/kestrel-buds': () => json(kestrel),
    });
    const { router } = renderApp('/projects/kestrel-buds');

    expect(await screen.findByRole('button', { name: 'Sign in' })).toBeTruthy();
    expect(router.state.location.search).toBe('?next=%2Fprojects%2Fkestrel-buds');

    await fillAndSubmit('qa@fernwick.test', 'correct-horse');
    expect(await screen.findByRole('heading', { name: 'Kestrel Buds' })).toBeTruthy();
    expect(router.state.location.pathname).toBe('/projects/kestrel-buds');
  });
});
