import type { CurrentUser, UserRow, WorkspaceAuditPage } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { json, mockApi, problem, seedSession } from './mock-api';
import { renderApp } from './render-app';

vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const admin: CurrentUser = { id: '00000000-0000-4000-8000-000000000007', email: 'ada@fernwick.test', displayName: 'Ada Admin', isAdmin: true, memberships: [] };
const viewer: CurrentUser = { ...admin, isAdmin: false, memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'viewer' }] };

const row = (over: Partial<UserRow>): UserRow => ({
  id: '00000000-0000-4000-8000-000000000100',
  email: 'bo@fernwick.test',
  displayName: 'Bo Brandt',
  isAdmin: false,
  disabled: false,
  status: 'active',
  createdAt: '2026-11-01T08:00:00.000Z',
  lastLoginAt: null,
  ...over,
});
const users: UserRow[] = [row({ id: admin.id, email: admin.email, displayName: admin.displayName, isAdmin: true }), row({})];

describe('admin area', () => {
  it('sends /users to the Users tab and refuses the invitation form without an e-mail, in words', async () => {
    seedSession();
    const api = mockApi({
      'GET /api/me': () => json(admin),
      'GET /api/admin/users': () => json({ items: users }),
      'POST /api/admin/users/invitations': () => json({ user: row({ id: '00000000-0000-4000-8000-000000000101', email: 'cy@fernwick.test', status: 'invited' }), expiresAt: '2026-12-06T08:00:00.000Z' }, 201),
    });
    const { router } = renderApp('/users');
    await screen.findByRole('heading', { name: 'Administration' });
    expect(router.state.location.pathname).toBe('/admin/users');
    expect(within(await screen.findByRole('table', { name: 'Users' })).getAllByRole('row')).toHaveLength(3);

    const user = userEvent.setup();
    await user.click(screen.getByRole('button', { name: 'Invite person' }));
    const dialog = screen.getByRole('dialog', { name: 'Invite a person' });
    await user.click(within(dialog).getByRole('button', { name: 'Send invitation' }));
    expect(within(dialog).getByText('Enter the e-mail address the invitation goes to.')).toBeTruthy();
    expect(api.requests.some((r) => r.method === 'POST')).toBe(false);

    await user.type(within(dialog).getByLabelText('E-mail'), 'cy@fernwick.test');
    await user.type(within(dialog).getByLabelText('Name'), 'Cy Ortega');
    await user.click(within(dialog).getByRole('button', { name: 'Send invitation' }));
    await screen.findByText('Invitation sent to cy@fernwick.test');
    expect(api.requests.find((r) => r.method === 'POST')?.body).toEqual({ email: 'cy@fernwick.test', displayName: 'Cy Ortega', isAdmin: false });
  });

  it('disables a person only after the confirmation, and not oneself', async () => {
    seedSession();
    const api = mockApi({
      'GET /api/me': () => json(admin),
      'GET /api/admin/users': () => json({ items: users }),
      'PATCH /api/admin/users/00000000-0000-4000-8000-000000000100': () => json(row({ disabled: true, status: 'disabled' })),
    });
    renderApp('/admin/users');
    const table = await screen.findByRole('table', { name: 'Users' });
    const [, own, other] = within(table).getAllByRole('row');
    expect((within(own!).getByRole('button', { name: 'Disable' }) as HTMLButtonElement).disabled).toBe(true);
    const user = userEvent.setup();
    await user.click(within(other!).getByRole('button', { name: 'Disable' }));
    const dialog = screen.getByRole('dialog', { name: 'Disable Bo Brandt?' });
    expect(api.requests.some((r) => r.method === 'PATCH')).toBe(false);
    await user.click(within(dialog).getByRole('button', { name: 'Disable' }));
    await screen.findByText('Bo Brandt is disabled');
    expect(api.requests.find((r) => r.method === 'PATCH')?.body).toEqual({ disabled: true });
  });

  it('shows the audit log with names linked to their pages and filters through the URL', async () => {
    seedSession();
    const page: WorkspaceAuditPage = {
      items: [
        {
          id: 'e1',
          at: '2026-12-03T06:00:00.000Z',
          action: 'build.create',
          actor: 'token:emk_7Hq2',
          subject: 'build:3f2a9c1d',
          actorRef: { ref: 'token:emk_7Hq2', kind: 'token', label: 'CI token “gitlab-main”', href: '/projects/kestrel-buds/tokens' },
          subjectRef: { ref: 'build:3f2a9c1d', kind: 'build', label: 'build 3f2a9c1 on main', href: '/projects/kestrel-buds/builds/3f2a9c1d' },
          projectKey: 'kestrel-buds',
          projectName: 'Kestrel Buds',
          details: {},
        },
      ],
      total: 1,
      page: 1,
      pageSize: 50,
    };
    const api = mockApi({ 'GET /api/me': () => json(admin), 'GET /api/admin/audit': () => json(page), 'GET /api/projects': () => json({ items: [] }) });
    const { router } = renderApp('/admin/audit?action=build.');
    const table = await screen.findByRole('table', { name: 'Workspace audit log' });
    expect(within(table).getByRole('link', { name: 'build 3f2a9c1 on main' }).getAttribute('href')).toBe('/projects/kestrel-buds/builds/3f2a9c1d');
    expect(within(table).getByRole('link', { name: 'Kestrel Buds' }).getAttribute('href')).toBe('/projects/kestrel-buds');
    expect(api.requests.find((r) => r.path === '/api/admin/audit')?.search).toBe('?action=build.&page=1&pageSize=50');
    const user = userEvent.setup();
    await user.type(screen.getByLabelText('Who (e-mail)'), 'qa@fernwick.test');
    await user.click(screen.getByRole('button', { name: 'Apply' }));
    await waitFor(() => expect(router.state.location.search).toBe('?actor=qa%40fernwick.test&action=build.'));
  });

  it('explains the area to someone who is not an administrator', async () => {
    seedSession();
    mockApi({ 'GET /api/me': () => json(viewer), 'GET /api/admin/users': () => problem(403, 'Forbidden', 'Only administrators may do this.') });
    renderApp('/admin');
    await screen.findByText('Only administrators manage the workspace');
    expect(screen.queryByRole('table')).toBeNull();
  });
});
