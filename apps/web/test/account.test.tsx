import type { CurrentUser, Session } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { SESSION_STORAGE_KEY } from '@/lib/session-store';
import { json, mockApi, qaUser, seedSession } from './mock-api';
import { renderApp } from './render-app';

// The capture page (another feature, with its plotting library) is not under test here.
vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const fresh: Session = { accessToken: 'access-after-change', refreshToken: 'refresh-after-change', expiresIn: 900, user: qaUser };

function setup(user: CurrentUser = qaUser, subscribed: Record<string, boolean> = { 'kestrel-buds': true, 'heron-bar': false }) {
  seedSession();
  const stored = { ...subscribed };
  const handlers: Parameters<typeof mockApi>[0] = {
    'GET /api/me': () => json(user),
    'GET /api/projects': () => json([]),
    'PUT /api/me/password': (r) => {
      const body = r.body as { currentPassword: string };
      if (body.currentPassword !== 'the-old-password') {
        return new Response(
          JSON.stringify({
            type: 'about:blank', title: 'Validation failed', status: 422, detail: 'The current password is wrong; the password was not changed.',
            errors: [{ path: 'body.currentPassword', message: 'does not match the password you sign in with' }],
          }),
          { status: 422, headers: { 'Content-Type': 'application/problem+json' } },
        );
      }
      return json(fresh);
    },
  };
  for (const key of Object.keys(stored)) {
    handlers[`GET /api/projects/${key}/subscription`] = () => json({ buildFailures: stored[key] });
    handlers[`PUT /api/projects/${key}/subscription`] = (r) => {
      stored[key] = (r.body as { buildFailures: boolean }).buildFailures;
      return json({ buildFailures: stored[key] });
    };
  }
  return { api: mockApi(handlers), stored };
}

async function fillPasswords(user: ReturnType<typeof userEvent.setup>, current: string, next: string, confirm = next) {
  const form = await screen.findByRole('form', { name: 'Change password' });
  await user.type(within(form).getByLabelText('Current password'), current);
  await user.type(within(form).getByLabelText('New password'), next);
  await user.type(within(form).getByLabelText('Repeat the new password'), confirm);
  await user.click(within(form).getByRole('button', { name: 'Change password' }));
  return form;
}

describe('account page', () => {
  it('is reached from the user menu and names the user', async () => {
    setup();
    const { router } = renderApp('/projects');
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: /Quinn Abara/ }));
    await user.click(screen.getByRole('menuitem', { name: 'Account' }));
    expect(router.state.location.pathname).toBe('/account');
    expect(await screen.findByRole('heading', { level: 1, name: 'Quinn Abara' })).toBeTruthy();
    expect(screen.getByText('qa@fernwick.test')).toBeTruthy();
  });

  it('checks the new password twice and by the shared rules before asking the API', async () => {
    const { api } = setup();
    renderApp('/account');
    const user = userEvent.setup();
    const form = await fillPasswords(user, 'the-old-password', 'short', 'shorter');
    expect(within(form).getByText('At least 10 characters.')).toBeTruthy();
    expect(within(form).getByText('Does not match the new password.')).toBeTruthy();
    expect(api.requests.some((r) => r.path === '/api/me/password')).toBe(false);
  });

  it('changes the password, keeps this tab signed in with the fresh session, and says so', async () => {
    const { api } = setup();
    renderApp('/account');
    const user = userEvent.setup();
    await fillPasswords(user, 'the-old-password', 'a-brand-new-secret');
    expect(await screen.findByText('Password changed')).toBeTruthy();
    expect(api.requests.find((r) => r.path === '/api/me/password')?.body).toEqual({ currentPassword: 'the-old-password', newPassword: 'a-brand-new-secret' });
    expect(JSON.parse(window.localStorage.getItem(SESSION_STORAGE_KEY)!)).toEqual({ accessToken: 'access-after-change', refreshToken: 'refresh-after-change' });
    // The fields are emptied, so nothing secret stays on screen.
    expect((screen.getByLabelText('New password') as HTMLInputElement).value).toBe('');
  });

  it("puts the API's word on a wrong current password beside that field", async () => {
    setup();
    renderApp('/account');
    const user = userEvent.setup();
    const form = await fillPasswords(user, 'a-wrong-guess', 'a-brand-new-secret');
    expect(await within(form).findByText('Does not match the password you sign in with.')).toBeTruthy();
    expect(within(form).getByLabelText('Current password').getAttribute('aria-invalid')).toBe('true');
    expect(await screen.findByText('Password not changed')).toBeTruthy();
    expect(JSON.parse(window.localStorage.getItem(SESSION_STORAGE_KEY)!)).toEqual({ accessToken: 'access-1', refreshToken: 'refresh-1' });
  });

  it('shows build-failure mail per project and saves each switch on its own', async () => {
    const { api, stored } = setup();
    renderApp('/account');
    const user = userEvent.setup();
    const list = await screen.findByRole('list', { name: 'Build-failure mail per project' });
    const kestrel = await within(list).findByRole('switch', { name: 'Build-failure mail for Kestrel Buds' });
    const heron = await within(list).findByRole('switch', { name: 'Build-failure mail for Heron Soundbar' });
    expect(kestrel.getAttribute('aria-checked')).toBe('true');
    expect(heron.getAttribute('aria-checked')).toBe('false');

    await user.click(heron);
    expect(await screen.findByText('Build-failure mail on for Heron Soundbar')).toBeTruthy();
    await waitFor(() => expect(heron.getAttribute('aria-checked')).toBe('true'));
    expect(stored).toEqual({ 'kestrel-buds': true, 'heron-bar': true });
    expect(api.requests.filter((r) => r.method === 'PUT').map((r) => [r.path, r.body])).toEqual([['/api/projects/heron-bar/subscription', { buildFailures: true }]]);
  });

  it('tells a user without projects that no project mail reaches them', async () => {
    setup({ ...qaUser, memberships: [] }, {});
    renderApp('/account');
    expect(await screen.findByText(/You are not a member of any project/)).toBeTruthy();
  });
});
