import type { CurrentUser, FindingRow, FindingsPage, MemberRow } from '@earmark/contracts';
import { QueryClientProvider } from '@tanstack/react-query';
import { render, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { MemoryRouter } from 'react-router';
import { describe, expect, it, vi } from 'vitest';
import { createQueryClient } from '@/app/query-client';
import { FindingsTriagePanel } from '@/features/findings/components/findings-triage-panel';
import { sessionStore } from '@/lib/session-store';
import { json, mockApi, seedSession } from './mock-api';
import { renderApp } from './render-app';

// The capture page (another feature, with its plotting library) is not under test here.
vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const id = (n: number) => `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`;

const engineer: CurrentUser = {
  id: id(1),
  email: 'eli@fernwick.test',
  displayName: 'Eli Okafor',
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'engineer' }],
};
const viewer: CurrentUser = { ...engineer, id: id(9), memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'viewer' }] };

const members: MemberRow[] = [
  { userId: id(1), email: 'eli@fernwick.test', displayName: 'Eli Okafor', role: 'engineer' },
  { userId: id(3), email: 'mara@fernwick.test', displayName: 'Mara Lindqvist', role: 'engineer' },
  { userId: id(9), email: 'rel@fernwick.test', displayName: 'Release Desk', role: 'viewer' },
];

function finding(n: number, overrides: Partial<FindingRow> = {}): FindingRow {
  return {
    id: id(900 + n),
    title: `Finding ${n}`,
    checkId: `chk-${n}`,
    state: 'open',
    testCase: 'eq.music.sweep',
    target: 'evt2-48k',
    buildSha: 'a81d44c09e2f7b3c1d5e6f708192a3b4c5d6e7f8',
    captureId: id(500 + n),
    assignee: null,
    margin: -1.3,
    unit: 'dB',
    worstHz: 8000,
    commentCount: n,
    createdAt: '2025-06-10T08:00:00.000Z',
    updatedAt: '2025-06-10T09:00:00.000Z',
    ...overrides,
  };
}

const page: FindingsPage = { items: [finding(1), finding(2), finding(3, { state: 'investigating' })], total: 3, page: 1, pageSize: 50 };

function setup(user: CurrentUser) {
  seedSession();
  const api = mockApi({
    'GET /api/me': () => json(user),
    'GET /api/projects/kestrel-buds/findings': () => json(page),
    'GET /api/projects/kestrel-buds/members': () => json({ items: members }),
    'GET /api/projects/kestrel-buds/targets': () => json({ items: [] }),
    'GET /api/projects/kestrel-buds/test-cases': () => json({ items: [] }),
    'POST /api/projects/kestrel-buds/findings/bulk': () => json({ items: [] }),
    [`POST /api/projects/kestrel-buds/findings/${id(901)}/waivers`]: () =>
      json({
        id: id(950), testCase: 'eq.music.sweep', target: 'evt2-48k', checkId: 'response', findingId: id(901), reason: 'Known shelf; fixed in 412.',
        until: '2030-01-31T23:59:59.999Z', state: 'requested', requestedBy: 'engineer@fernwick.test', approvedBy: null, decisionComment: null, decidedAt: null, createdAt: '2025-06-10T09:00:00.000Z',
      }, 201),
    [`PATCH /api/projects/kestrel-buds/findings/${id(901)}`]: () => json(finding(1, { state: 'investigating' })),
    [`GET /api/projects/kestrel-buds/findings/${id(902)}/comments`]: () =>
      json({ items: [{ id: 'k1', author: { id: id(3), displayName: 'Mara Lindqvist' }, body: 'Only on EVT2.', createdAt: '2025-06-10T09:30:00.000Z' }] }),
    [`POST /api/projects/kestrel-buds/findings/${id(902)}/comments`]: () =>
      json({ id: 'k2', author: { id: id(1), displayName: 'Eli Okafor' }, body: 'Bisecting.', createdAt: '2025-06-10T10:00:00.000Z' }),
  });
  const findingQueries = () =>
    api.fetchMock.mock.calls
      .map(([input]) => new URL(String(input), 'http://localhost'))
      .filter((url) => url.pathname === '/api/projects/kestrel-buds/findings')
      .map((url) => Object.fromEntries(url.searchParams));
  const sent = (method: string, path: string) => api.requests.filter((r) => r.method === method && r.path === path).map((r) => r.body);
  return { api, findingQueries, sent };
}

describe('findings queue', () => {
  it('asks for active findings by default and keeps filters in the URL', async () => {
    const { findingQueries } = setup(engineer);
    const { router } = renderApp('/projects/kestrel-buds/findings?assignee=me');
    const user = userEvent.setup();

    expect(await screen.findByRole('heading', { name: 'Findings' })).toBeTruthy();
    await screen.findByRole('table', { name: 'Findings' });
    // The queue opens on main's findings; other branches are one filter away.
    expect(findingQueries()[0]).toEqual({ page: '1', pageSize: '50', state: 'active', branch: 'main', assignee: 'me' });

    await user.selectOptions(screen.getByLabelText('State'), 'all');
    expect(Object.fromEntries(new URLSearchParams(router.state.location.search))).toEqual({ assignee: 'me', state: 'all' });
    // "Any state" sends no state filter at all.
    await waitFor(() => expect(findingQueries().at(-1)).toEqual({ page: '1', pageSize: '50', branch: 'main', assignee: 'me' }));

    await waitFor(() => expect(screen.getByLabelText('Assignee')).toHaveProperty('value', 'me'));
    await user.selectOptions(screen.getByLabelText('Assignee'), 'none');
    expect(Object.fromEntries(new URLSearchParams(router.state.location.search))).toEqual({ assignee: 'none', state: 'all' });
  });

  it('assigns and sets the state of a selection in one request each', async () => {
    const { sent } = setup(engineer);
    renderApp('/projects/kestrel-buds/findings');
    const user = userEvent.setup();
    const table = await screen.findByRole('table', { name: 'Findings' });

    await user.click(within(table).getByRole('checkbox', { name: 'Select Finding 1' }));
    await user.click(within(table).getByRole('checkbox', { name: 'Select Finding 3' }));
    const bar = screen.getByRole('region', { name: 'Bulk actions' });
    expect(bar.textContent).toContain('2 selected');

    await user.click(within(bar).getByRole('button', { name: 'Assign' }));
    await user.click(within(screen.getByRole('menu', { name: 'Assign selected findings to' })).getByRole('menuitemradio', { name: 'Mara Lindqvist' }));
    await waitFor(() => expect(sent('POST', '/api/projects/kestrel-buds/findings/bulk')).toEqual([{ ids: [id(901), id(903)], assigneeId: id(3) }]));

    // The selection is cleared after a bulk action; select again for the state change.
    await waitFor(() => expect(screen.queryByRole('region', { name: 'Bulk actions' })).toBeNull());
    await user.click(within(table).getByRole('checkbox', { name: 'Select all findings on this page' }));
    await user.click(within(screen.getByRole('region', { name: 'Bulk actions' })).getByRole('button', { name: 'Set state' }));
    await user.click(screen.getByRole('menuitemradio', { name: /Not a defect/ }));
    await waitFor(() =>
      expect(sent('POST', '/api/projects/kestrel-buds/findings/bulk')[1]).toEqual({ ids: [id(901), id(902), id(903)], state: 'not_a_defect' }),
    );
    // Viewers are not offered as assignees.
    await user.click(within(table).getAllByRole('button', { name: 'Assign' })[0]!);
    expect(screen.queryByRole('menuitemradio', { name: /Release Desk/ })).toBeNull();
    expect(screen.getByRole('menuitemradio', { name: 'Eli Okafor (me)' })).toBeTruthy();
  });

  it('changes one finding with PATCH and refetches the queue', async () => {
    const { sent, findingQueries } = setup(engineer);
    renderApp('/projects/kestrel-buds/findings');
    const user = userEvent.setup();
    const table = await screen.findByRole('table', { name: 'Findings' });
    const row = table.querySelector<HTMLElement>(`tr[data-finding-id="${id(901)}"]`)!;
    const before = findingQueries().length;

    await user.click(within(row).getByRole('button', { name: /State: Open/ }));
    await user.click(screen.getByRole('menuitemradio', { name: /Investigating/ }));
    await waitFor(() => expect(sent('PATCH', `/api/projects/kestrel-buds/findings/${id(901)}`)).toEqual([{ state: 'investigating' }]));
    await waitFor(() => expect(findingQueries().length).toBeGreaterThan(before));

    await user.click(within(row).getByRole('button', { name: 'Assign' }));
    await user.click(screen.getByRole('menuitemradio', { name: 'Eli Okafor (me)' }));
    await waitFor(() => expect(sent('PATCH', `/api/projects/kestrel-buds/findings/${id(901)}`)[1]).toEqual({ assigneeId: id(1) }));
    expect(within(row).getByRole('link', { name: 'Finding 1' }).getAttribute('href')).toBe(
      `/projects/kestrel-buds/builds/a81d44c09e2f7b3c1d5e6f708192a3b4c5d6e7f8/captures/${id(501)}`,
    );
  });

  it('lists and adds comments in the side panel', async () => {
    const { sent } = setup(engineer);
    renderApp('/projects/kestrel-buds/findings');
    const user = userEvent.setup();
    const table = await screen.findByRole('table', { name: 'Findings' });
    const row = table.querySelector<HTMLElement>(`tr[data-finding-id="${id(902)}"]`)!;

    await user.click(within(row).getByRole('button', { name: /Comments/ }));
    const panel = await screen.findByRole('dialog', { name: 'Comments' });
    expect(await within(panel).findByText('Only on EVT2.')).toBeTruthy();
    await user.type(within(panel).getByLabelText('Comment'), 'Bisecting.');
    await user.click(within(panel).getByRole('button', { name: 'Add comment' }));
    await waitFor(() => expect(sent('POST', `/api/projects/kestrel-buds/findings/${id(902)}/comments`)).toEqual([{ body: 'Bisecting.' }]));
    await waitFor(() => expect(within(panel).getByLabelText('Comment')).toHaveProperty('value', ''));

    await user.keyboard('{Escape}');
    expect(screen.queryByRole('dialog')).toBeNull();
  });

  it('shows viewers the queue without any triage controls', async () => {
    setup(viewer);
    renderApp('/projects/kestrel-buds/findings');
    const user = userEvent.setup();
    const table = await screen.findByRole('table', { name: 'Findings' });

    expect(within(table).getAllByRole('row')).toHaveLength(4);
    expect(within(table).queryAllByRole('checkbox')).toHaveLength(0);
    expect(screen.queryByRole('button', { name: 'Assign' })).toBeNull();
    expect(screen.queryByRole('button', { name: /^State:/ })).toBeNull();
    expect(within(table).getAllByText('Open')).toHaveLength(2);

    // They can read the discussion but not add to it.
    await user.click(within(table).getAllByRole('button', { name: /Comments/ })[1]!);
    const panel = await screen.findByRole('dialog', { name: 'Comments' });
    expect(await within(panel).findByText('Only on EVT2.')).toBeTruthy();
    expect(within(panel).queryByRole('button', { name: 'Add comment' })).toBeNull();
  });
});

describe('FindingsTriagePanel', () => {
  function renderPanel(user: CurrentUser) {
    seedSession();
    sessionStore.reload();
    const queryClient = createQueryClient();
    queryClient.setDefaultOptions({ queries: { retry: false } });
    // The app shell has loaded the user before any page renders.
    queryClient.setQueryData(['me'], user);
    render(
      <QueryClientProvider client={queryClient}>
        <MemoryRouter>
          <FindingsTriagePanel projectKey="kestrel-buds" captureId={id(501)} />
        </MemoryRouter>
      </QueryClientProvider>,
    );
  }

  it("lists one capture's findings with triage controls for engineers", async () => {
    const { findingQueries, sent } = setup(engineer);
    renderPanel(engineer);
    const user = userEvent.setup();

    expect(await screen.findByText('Finding 1')).toBeTruthy();
    expect(findingQueries()[0]).toEqual({ page: '1', pageSize: '200', captureId: id(501) });
    const item = document.querySelector<HTMLElement>(`li[data-finding-id="${id(901)}"]`)!;
    await user.click(within(item).getByRole('button', { name: /State: Open/ }));
    await user.click(screen.getByRole('menuitemradio', { name: /Investigating/ }));
    await waitFor(() => expect(sent('PATCH', `/api/projects/kestrel-buds/findings/${id(901)}`)).toEqual([{ state: 'investigating' }]));
  });

  it('requests a waiver for a finding with reason, date and scope', async () => {
    const { sent } = setup(engineer);
    renderPanel(engineer);
    const user = userEvent.setup();
    expect(await screen.findByText('Finding 1')).toBeTruthy();
    const item = document.querySelector<HTMLElement>(`li[data-finding-id="${id(901)}"]`)!;
    await user.click(within(item).getByRole('button', { name: 'Request waiver' }));
    const dialog = screen.getByRole('dialog');
    await user.click(within(dialog).getByRole('button', { name: 'Send for approval' }));
    expect(within(dialog).getByText(/say why the deviation is acceptable/)).toBeTruthy(); // checked before any request
    await user.type(within(dialog).getByLabelText('Reason'), 'Known shelf; fixed in 412.');
    const until = within(dialog).getByLabelText('Until');
    await user.clear(until);
    await user.type(until, '2030-01-31');
    await user.click(within(dialog).getByRole('button', { name: 'Send for approval' }));
    await waitFor(() =>
      expect(sent('POST', `/api/projects/kestrel-buds/findings/${id(901)}/waivers`)).toEqual([{ reason: 'Known shelf; fixed in 412.', until: '2030-01-31', targetOnly: true }]),
    );
  });

  it('is read-only for viewers', async () => {
    setup(viewer);
    renderPanel(viewer);
    expect(await screen.findByText('Finding 1')).toBeTruthy();
    expect(screen.queryByRole('button', { name: 'Assign' })).toBeNull();
    expect(screen.queryByRole('button', { name: /^State:/ })).toBeNull();
    expect(screen.queryByRole('button', { name: 'Request waiver' })).toBeNull();
  });
});
