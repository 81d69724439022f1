import type { ApiTokenRow, CreatedApiToken, CurrentUser } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { json, mockApi, seedSession } from './mock-api';
import { renderApp } from './render-app';

// The capture page (another feature, with its plotting library) is not under test here.
vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const admin: CurrentUser = {
  id: '00000000-0000-4000-8000-000000000007',
  email: 'ada@fernwick.test',
  displayName: 'Ada Admin',
  isAdmin: true,
  memberships: [],
};
const engineer: CurrentUser = {
  ...admin,
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'engineer' }],
};

const existing: ApiTokenRow = {
  id: '00000000-0000-4000-8000-000000000700',
  name: 'gitlab-main',
  prefix: 'emk_7Hq2',
  scopes: ['submit-captures', 'read-verdicts'],
  createdAt: '2025-05-01T08:00:00.000Z',
  lastUsedAt: '2025-06-10T08:00:00.000Z',
  revokedAt: null,
  expiresAt: null,
};
const created: CreatedApiToken = {
  ...existing,
  id: '00000000-0000-4000-8000-000000000701',
  name: 'nightly-rig',
  prefix: 'emk_Zp0c',
  scopes: ['read-verdicts'],
  lastUsedAt: null,
  secret: 'emk_Zp0c.s3cr3t-only-once',
};

function setup(user: CurrentUser) {
  seedSession();
  let tokens: ApiTokenRow[] = [existing];
  const api = mockApi({
    'GET /api/me': () => json(user),
    'GET /api/projects/kestrel-buds/tokens': () => json({ items: tokens }),
    'POST /api/projects/kestrel-buds/tokens': () => {
      const { secret: _secret, ...row } = created;
      tokens = [...tokens, row];
      return json(created, 201);
    },
    [`DELETE /api/projects/kestrel-buds/tokens/${existing.id}`]: () => {
      tokens = tokens.map((token) => (token.id === existing.id ? { ...token, revokedAt: '2025-06-11T08:00:00.000Z' } : token));
      return json(tokens[0]);
    },
  });
  return api;
}

describe('API tokens page', () => {
  it('shows a new token secret once and forgets it when the dialog closes', async () => {
    const api = setup(admin);
    renderApp('/projects/kestrel-buds/tokens');
    const user = userEvent.setup();

    expect(await screen.findByRole('heading', { name: 'API tokens' })).toBeTruthy();
    expect(within(screen.getByRole('table', { name: 'API tokens' })).getByText('gitlab-main')).toBeTruthy();

    await user.click(screen.getByRole('button', { name: 'Create token' }));
    const dialog = screen.getByRole('dialog', { name: 'Create an API token' });
    await user.type(within(dialog).getByLabelText('Name'), 'nightly-rig');
    await user.click(within(dialog).getByRole('checkbox', { name: /Submit captures/ }));
    await user.click(within(dialog).getByRole('button', { name: 'Create token' }));

    const shown = await screen.findByTestId('token-secret');
    expect(shown.textContent).toBe('emk_Zp0c.s3cr3t-only-once');
    expect(screen.getByRole('dialog', { name: 'Token created' }).textContent).toContain('you will not see it again');
    expect(api.requests.find((r) => r.method === 'POST')?.body).toEqual({ name: 'nightly-rig', scopes: ['read-verdicts'] });

    await user.click(screen.getByRole('button', { name: 'Copy' }));
    expect(await navigator.clipboard.readText()).toBe('emk_Zp0c.s3cr3t-only-once');

    await user.click(screen.getByRole('button', { name: 'Done' }));
    expect(screen.queryByTestId('token-secret')).toBeNull();
    expect(document.body.textContent).not.toContain('s3cr3t-only-once');
    // The list shows the new token (without its secret) after a refetch.
    expect(await within(screen.getByRole('table', { name: 'API tokens' })).findByText('nightly-rig')).toBeTruthy();

    // Opening the dialog again starts a fresh form; the old secret is not kept anywhere.
    await user.click(screen.getByRole('button', { name: 'Create token' }));
    expect(screen.getByRole('dialog', { name: 'Create an API token' })).toBeTruthy();
    expect(screen.queryByTestId('token-secret')).toBeNull();
    expect(document.body.textContent).not.toContain('s3cr3t-only-once');
  });

  it('refuses to create a token without a name or scopes, before asking the API', async () => {
    const api = setup(admin);
    renderApp('/projects/kestrel-buds/tokens');
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: 'Create token' }));
    const dialog = screen.getByRole('dialog', { name: 'Create an API token' });
    await user.click(within(dialog).getByRole('checkbox', { name: /Submit captures/ }));
    await user.click(within(dialog).getByRole('checkbox', { name: /Read verdicts/ }));
    await user.click(within(dialog).getByRole('button', { name: 'Create token' }));
    expect(within(dialog).getByText(/Give the token a name/)).toBeTruthy();
    expect(within(dialog).getByText('Choose at least one scope.')).toBeTruthy();
    expect(api.requests.some((r) => r.method === 'POST')).toBe(false);
  });

  it('revokes a token only after confirmation', async () => {
    const api = setup(admin);
    renderApp('/projects/kestrel-buds/tokens');
    const user = userEvent.setup();
    const table = await screen.findByRole('table', { name: 'API tokens' });

    await user.click(within(table).getByRole('button', { name: 'Revoke' }));
    const confirm = screen.getByRole('dialog', { name: 'Revoke “gitlab-main”?' });
    await user.click(within(confirm).getByRole('button', { name: 'Cancel' }));
    expect(api.requests.some((r) => r.method === 'DELETE')).toBe(false);

    await user.click(within(table).getByRole('button', { name: 'Revoke' }));
    await user.click(within(screen.getByRole('dialog')).getByRole('button', { name: 'Revoke' }));
    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
    expect(api.requests.filter((r) => r.method === 'DELETE').map((r) => r.path)).toEqual([`/api/projects/kestrel-buds/tokens/${existing.id}`]);
    expect(await within(table).findByText(/Revoked/)).toBeTruthy();
    expect(within(table).queryByRole('button', { name: 'Revoke' })).toBeNull();
  });

  it('is for administrators only: no nav entry, no list, no create button', async () => {
    const api = setup(engineer);
    renderApp('/projects/kestrel-buds/tokens');

    expect(await screen.findByText('Only administrators manage API tokens')).toBeTruthy();
    expect(screen.queryByRole('button', { name: 'Create token' })).toBeNull();
    expect(within(screen.getByRole('navigation', { name: 'Main' })).queryByRole('link', { name: 'API tokens' })).toBeNull();
    expect(api.requests.some((r) => r.path.endsWith('/tokens'))).toBe(false);
  });

  it('sends the chosen expiry and refuses a day already past, before asking the API', async () => {
    const api = setup(admin);
    renderApp('/projects/kestrel-buds/tokens');
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: 'Create token' }));
    const dialog = screen.getByRole('dialog', { name: 'Create an API token' });
    await user.type(within(dialog).getByLabelText('Name'), 'nightly-rig');
    expect((within(dialog).getByLabelText('Expires') as HTMLSelectElement).value).toBe('never');

    await user.selectOptions(within(dialog).getByLabelText('Expires'), 'On a date…');
    await user.type(within(dialog).getByLabelText('Last day of use'), '2020-02-03');
    await user.click(within(dialog).getByRole('button', { name: 'Create token' }));
    expect(within(dialog).getByText('Pick today or a later day.')).toBeTruthy();
    expect(api.requests.some((r) => r.method === 'POST')).toBe(false);

    await user.selectOptions(within(dialog).getByLabelText('Expires'), 'In 90 days');
    const before = Date.now();
    await user.click(within(dialog).getByRole('button', { name: 'Create token' }));
    await screen.findByTestId('token-secret');
    const body = api.requests.find((r) => r.method === 'POST')?.body as { expiresAt: string };
    const days = (Date.parse(body.expiresAt) - before) / 86_400_000;
    expect(days).toBeGreaterThan(89.99);
    expect(days).toBeLessThan(90.01);
  });

  it('says when each token expires, and that an expired one expired', async () => {
    seedSession();
    const day = 86_400_000;
    mockApi({
      'GET /api/me': () => json(admin),
      'GET /api/projects/kestrel-buds/tokens': () =>
        json({
          items: [
            { ...existing, id: '00000000-0000-4000-8000-000000000801', name: 'soon', expiresAt: new Date(Date.now() + 30 * day - 1000).toISOString() },
            { ...existing, id: '00000000-0000-4000-8000-000000000802', name: 'gone', expiresAt: new Date(Date.now() - 2 * day).toISOString() },
            existing,
          ],
        }),
    });
    renderApp('/projects/kestrel-buds/tokens');
    const table = await screen.findByRole('table', { name: 'API tokens' });
    const row = (name: string) => within(table).getByText(name).closest('tr')!;
    expect(row('soon').textContent).toContain('Active· expires in 30 days');
    expect(row('gone').textContent).toContain('Expired· expired 2 days ago');
    expect(within(row('gone')).queryByRole('button', { name: 'Revoke' })).toBeNull();
    expect(row('gitlab-main').textContent).toContain('Active· never expires');
  });

  it('lists API tokens in the navigation for administrators', async () => {
    setup(admin);
    renderApp('/projects/kestrel-buds/tokens');
    const nav = await screen.findByRole('navigation', { name: 'Main' });
    expect(within(nav).getByRole('link', { name: 'API tokens' }).getAttribute('href')).toBe('/projects/kestrel-buds/tokens');
  });
});
