import type { CurrentUser, WaiverDto } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { isRevocable } from '@/features/approvals/utils/revocable';
import { json, mockApi, seedSession } from './mock-api';
import { renderApp } from './render-app';

vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const member = (role: 'qa_manager' | 'engineer'): CurrentUser => ({
  id: `u-${role}`,
  email: `${role}@fernwick.test`,
  displayName: role === 'qa_manager' ? 'Quinn Abara' : 'Eli Marsh',
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role }],
});

const waiver = (n: number, over: Partial<WaiverDto>): WaiverDto => ({
  id: `00000000-0000-4000-8000-00000000040${n}`,
  project: 'kestrel-buds',
  testCase: 'eq.sweep',
  target: 'rev-b',
  checkId: `check-${n}`,
  reason: 'Known tweeter resonance on rev B boards',
  until: '2099-09-30T23:59:59.999Z',
  state: 'approved',
  active: true,
  requestedBy: 'eli@fernwick.test',
  decidedBy: 'dana@fernwick.test',
  decidedAt: '2025-06-03T08:00:00.000Z',
  decisionComment: null,
  findingId: null,
  createdAt: '2025-06-02T08:00:00.000Z',
  ...over,
});

const requested = waiver(1, { state: 'requested', active: false, decidedBy: null, decidedAt: null });
const inForce = waiver(2, { target: null });
// Approved, but its date passed and the sweep has not expired it yet.
const pastItsDate = waiver(3, { until: '2025-06-10T23:59:59.999Z', active: false });

function setup(user: CurrentUser) {
  seedSession();
  let approved = [inForce, pastItsDate];
  const api = mockApi({
    'GET /api/me': () => json(user),
    'GET /api/projects/kestrel-buds/masks': () => json({ items: [] }),
    'GET /api/projects/kestrel-buds/waivers': (r) => json({ items: r.search === '?state=approved' ? approved : r.search === '?state=requested' ? [requested] : [] }),
    [`POST /api/projects/kestrel-buds/waivers/${inForce.id}/revoke`]: () => {
      approved = [pastItsDate];
      return json({ ...inForce, state: 'revoked', active: false });
    },
  });
  return api;
}

describe('revoking a waiver', () => {
  it('offers Revoke to a QA manager on an approved waiver in force only, and sends the reason to the waiver’s revoke URL', async () => {
    const api = setup(member('qa_manager'));
    const { queryClient } = renderApp('/projects/kestrel-buds/approvals');
    const user = userEvent.setup();

    const active = await screen.findByRole('article', { name: 'Waiver in force: check-2 on eq.sweep' });
    expect(within(active).getByText(/Runs until/).textContent).toContain('requested by eli@fernwick.test · approved by dana@fernwick.test');
    const expiring = screen.getByRole('article', { name: 'Waiver in force: check-3 on eq.sweep' });
    expect(within(expiring).getByText(/Past its date/)).toBeTruthy();
    expect(within(expiring).queryByRole('button', { name: 'Revoke' })).toBeNull();
    const requestedCard = screen.getByRole('article', { name: 'Waiver of check-1 on eq.sweep' });
    expect(within(requestedCard).queryByRole('button', { name: 'Revoke' })).toBeNull();
    expect(screen.getAllByRole('button', { name: 'Revoke' })).toHaveLength(1);

    // A build query of the project, to see the revocation refresh it.
    const buildsKey = ['projects', 'kestrel-buds', 'builds', 'list', {}];
    queryClient.setQueryData(buildsKey, { items: [] });

    await user.click(within(active).getByRole('button', { name: 'Revoke' }));
    const dialog = await screen.findByRole('dialog', { name: 'Revoke waiver' });
    expect(within(dialog).getByText('check-2 on eq.sweep · every target')).toBeTruthy();
    expect(within(dialog).getByRole('note').textContent).toContain('The checks it covers count as failures again at once');

    // The reason is required: nothing is sent without one.
    await user.click(within(dialog).getByRole('button', { name: 'Revoke waiver' }));
    expect(within(dialog).getByText('say why the waiver is revoked')).toBeTruthy();
    expect(api.requests.some((r) => r.method === 'POST')).toBe(false);

    await user.type(within(dialog).getByLabelText('Reason'), '  Rev C boards are in; the resonance is gone.  ');
    await user.click(within(dialog).getByRole('button', { name: 'Revoke waiver' }));
    await waitFor(() => expect(screen.queryByRole('dialog', { name: 'Revoke waiver' })).toBeNull());
    const posts = api.requests.filter((r) => r.method === 'POST');
    expect(posts.map((r) => [r.path, r.body])).toEqual([[`/api/projects/kestrel-buds/waivers/${inForce.id}/revoke`, { reason: 'Rev C boards are in; the resonance is gone.' }]]);

    // The waiver list and the project's build queries refresh.
    await waitFor(() => expect(screen.queryByRole('article', { name: 'Waiver in force: check-2 on eq.sweep' })).toBeNull());
    expect(api.requests.filter((r) => r.method === 'GET' && r.search === '?state=approved')).toHaveLength(2);
    expect(queryClient.getQueryState(buildsKey)?.isInvalidated).toBe(true);
  });

  it('never offers Revoke to an engineer', async () => {
    const api = setup(member('engineer'));
    renderApp('/projects/kestrel-buds/approvals');
    expect(await screen.findByText('Only QA managers and administrators approve')).toBeTruthy();
    expect(screen.queryByRole('button', { name: 'Revoke' })).toBeNull();
    // They read the waivers (a "waiver already requested" link lands here), but decide none.
    expect(api.requests.some((r) => r.path.endsWith('/waivers'))).toBe(true);
    expect(screen.queryByRole('button', { name: 'Approve' })).toBeNull();
    expect(api.requests.some((r) => r.path.endsWith('/masks') && r.search.includes('in_review'))).toBe(false);
  });

  it('offers it only on an approved waiver still in force, and only to someone who may decide waivers', () => {
    expect(isRevocable(inForce, true)).toBe(true);
    expect(isRevocable(inForce, false)).toBe(false);
    expect(isRevocable(pastItsDate, true)).toBe(false);
    for (const state of ['requested', 'rejected', 'expired', 'revoked'] as const) expect(isRevocable({ ...inForce, state }, true)).toBe(false);
  });
});
