import type { CurrentUser, ProjectAuditRow } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { json, mockApi, seedSession } from './mock-api';
import { renderApp } from './render-app';

vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const admin: CurrentUser = { id: 'u-admin', email: 'ada@fernwick.test', displayName: 'Ada Admin', isAdmin: true, memberships: [] };
const engineer: CurrentUser = {
  id: 'u-eng',
  email: 'eli@fernwick.test',
  displayName: 'Eli Okafor',
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'engineer' }],
};

const row = (n: number): ProjectAuditRow => ({
  id: `a-${n}`,
  at: '2025-06-03T08:00:00.000Z',
  actor: 'user:qa@fernwick.test',
  action: 'mask.approve',
  fromState: 'in_review',
  toState: 'approved',
  comment: n === 1 ? 'Looks right on both boards' : null,
  details: {},
  subject: `mask:eq.sweep#${n}`,
});

function setup(user: CurrentUser) {
  seedSession();
  const api = mockApi({
    'GET /api/me': () => json(user),
    'GET /api/projects/kestrel-buds/members': () =>
      json({ items: [{ userId: 'u-qa', email: 'qa@fernwick.test', displayName: 'Quinn Abara', role: 'qa_manager' }] }),
    'GET /api/projects/kestrel-buds/audit': () => json({ items: [row(1), row(2)], total: 120, page: 1, pageSize: 50 }),
  });
  const auditQueries = () =>
    api.fetchMock.mock.calls
      .map(([input]) => new URL(String(input), 'http://localhost'))
      .filter((url) => url.pathname === '/api/projects/kestrel-buds/audit')
      .map((url) => Object.fromEntries(url.searchParams));
  return { ...api, auditQueries };
}

describe('audit log', () => {
  it('keeps its filters and page in the URL and sends them to the API', async () => {
    const { auditQueries } = setup(admin);
    const { router } = renderApp('/projects/kestrel-buds/audit?entity=mask');
    const user = userEvent.setup();

    expect(await screen.findByRole('heading', { name: 'Audit log' })).toBeTruthy();
    const table = await screen.findByRole('table', { name: 'Audit log' });
    expect(within(table).getByText('mask:eq.sweep#1')).toBeTruthy();
    expect(auditQueries()[0]).toEqual({ entity: 'mask', page: '1', pageSize: '50' });

    await waitFor(() => expect(screen.getByRole('option', { name: /Quinn Abara/ })).toBeTruthy());
    await user.selectOptions(screen.getByLabelText('Actor'), 'user:qa@fernwick.test');
    expect(Object.fromEntries(new URLSearchParams(router.state.location.search))).toEqual({ actor: 'user:qa@fernwick.test', entity: 'mask' });

    await user.type(screen.getByLabelText('Action'), 'waiver.{Enter}');
    expect(Object.fromEntries(new URLSearchParams(router.state.location.search))).toEqual({
      actor: 'user:qa@fernwick.test',
      action: 'waiver.',
      entity: 'mask',
    });
    await waitFor(() => expect(auditQueries().at(-1)).toEqual({ actor: 'user:qa@fernwick.test', action: 'waiver.', entity: 'mask', page: '1', pageSize: '50' }));

    await user.click(screen.getByRole('button', { name: /next/i }));
    expect(new URLSearchParams(router.state.location.search).get('page')).toBe('2');
    await waitFor(() => expect(auditQueries().at(-1)?.page).toBe('2'));

    await user.click(screen.getByRole('button', { name: 'Clear filters' }));
    expect(router.state.location.search).toBe('');
  });

  it('is not offered to engineers', async () => {
    const { auditQueries } = setup(engineer);
    renderApp('/projects/kestrel-buds/audit');
    expect(await screen.findByText('Only QA managers and administrators read the audit log')).toBeTruthy();
    expect(screen.queryByRole('link', { name: 'Audit log' })).toBeNull();
    expect(screen.queryByRole('link', { name: 'Approvals' })).toBeNull();
    expect(screen.getByRole('link', { name: 'Test cases' })).toBeTruthy();
    expect(auditQueries()).toHaveLength(0);
  });
});
