import type { BuildSummary, BuildsPage, CurrentUser } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { json, mockApi, seedSession } from './mock-api';
import { renderApp } from './render-app';

// The capture page (another feature, with its plotting library) is not under test here.
vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const engineer: CurrentUser = {
  id: '00000000-0000-4000-8000-000000000001',
  email: 'eli@fernwick.test',
  displayName: 'Eli Okafor',
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'engineer' }],
};

function build(sha: string, overrides: Partial<BuildSummary> = {}): BuildSummary {
  return {
    id: `b-${sha}`,
    projectKey: 'kestrel-buds',
    sha,
    label: null,
    branch: 'main',
    pipelineUrl: null,
    status: 'pass',
    createdAt: '2025-06-10T08:00:00.000Z',
    captureCount: 4,
    counts: { pass: 4, fail: 0, error: 0, pending: 0 },
    ...overrides,
  };
}

const page: BuildsPage = {
  items: [
    build('a81d44c09e2f7b3c1d5e6f708192a3b4c5d6e7f8', { status: 'fail', label: 'nightly', counts: { pass: 3, fail: 1, error: 0, pending: 0 } }),
    build('5c0e9b1f7a2d3c4b5a69788796a5b4c3d2e1f0a9', { branch: 'feature/anc' }),
  ],
  total: 60,
  page: 1,
  pageSize: 25,
};

function setup() {
  seedSession();
  const api = mockApi({
    'GET /api/me': () => json(engineer),
    'GET /api/projects/kestrel-buds/builds': () => json(page),
    'GET /api/projects/kestrel-buds/builds/trend': () => json({ points: [] }),
    'GET /api/projects/kestrel-buds/targets': () =>
      json({ items: [{ key: 'evt2-48k', name: 'EVT2 48 kHz', description: '', sampleRate: 48000, createdAt: '2025-01-01T00:00:00.000Z' }] }),
  });
  /** Query strings of every builds-list request, in order. */
  const buildQueries = () =>
    api.fetchMock.mock.calls
      .map(([input]) => new URL(String(input), 'http://localhost'))
      .filter((url) => url.pathname === '/api/projects/kestrel-buds/builds')
      .map((url) => Object.fromEntries(url.searchParams));
  return { api, buildQueries };
}

describe('builds table', () => {
  it('sends the table state from the URL to the API and renders verdicts and counts', async () => {
    const { buildQueries } = setup();
    renderApp('/projects/kestrel-buds/builds?page=2&sort=branch&status=fail&sha=A81D&target=evt2-48k&from=2025-06-01&to=2025-06-30');

    expect(await screen.findByRole('heading', { name: 'Builds' })).toBeTruthy();
    expect(buildQueries()[0]).toEqual({
      page: '2',
      pageSize: '25',
      sort: 'branch',
      status: 'fail',
      sha: 'a81d',
      target: 'evt2-48k',
      from: '2025-06-01',
      to: '2025-06-30',
    });

    const table = screen.getByRole('table', { name: 'Builds' });
    const rows = within(table).getAllByRole('row').slice(1);
    expect(rows.map((row) => row.getAttribute('data-sha')?.slice(0, 7))).toEqual(['a81d44c', '5c0e9b1']);
    const first = rows[0]!;
    expect(within(first).getByRole('link', { name: 'a81d44c' }).getAttribute('href')).toBe(
      '/projects/kestrel-buds/builds/a81d44c09e2f7b3c1d5e6f708192a3b4c5d6e7f8',
    );
    expect(within(first).getByText('Fail')).toBeTruthy();
    expect(within(first).getByText('nightly')).toBeTruthy();
    // Counts carry the verdict as words for screen readers, not colour alone.
    expect(within(first).getByText('fail', { exact: false, selector: '.sr-only' })).toBeTruthy();
    expect(screen.getByRole('columnheader', { name: /Branch/ }).getAttribute('aria-sort')).toBe('ascending');
    // Hand-edited junk is ignored rather than sent.
    expect(screen.getByLabelText('Status')).toHaveProperty('value', 'fail');
  });

  it("shows each build's status as the server sent it, never one worked out from the counts", async () => {
    seedSession();
    // The server's rule (an error outranks a failure) is applied once, on the server; the table only shows it.
    const failAndError = build('e77a0c3d5b1f', { status: 'error', counts: { pass: 1, fail: 1, error: 1, pending: 0 }, captureCount: 3 });
    const stillRunning = build('0f9e8d7c6b5a', { status: 'running', counts: { pass: 2, fail: 1, error: 0, pending: 1 } });
    mockApi({
      'GET /api/me': () => json(engineer),
      'GET /api/projects/kestrel-buds/builds': () => json({ items: [failAndError, stillRunning], total: 2, page: 1, pageSize: 25 }),
      'GET /api/projects/kestrel-buds/builds/trend': () => json({ points: [] }),
      'GET /api/projects/kestrel-buds/targets': () => json({ items: [] }),
    });
    renderApp('/projects/kestrel-buds/builds');
    const table = await screen.findByRole('table', { name: 'Builds' });
    const column = within(table).getAllByRole('columnheader').findIndex((h) => /^Status/.test(h.textContent ?? ''));
    const statusOf = (sha: string) => within(table.querySelector(`tr[data-sha="${sha}"]`) as HTMLElement).getAllByRole('cell')[column]!.textContent;
    expect(statusOf('e77a0c3d5b1f')).toBe('Error');
    expect(statusOf('0f9e8d7c6b5a')).toBe('Running');
  });

  it('drops invalid URL values instead of sending them', async () => {
    const { buildQueries } = setup();
    renderApp('/projects/kestrel-buds/builds?status=green&sha=xyz&page=0');
    await screen.findByRole('table', { name: 'Builds' });
    expect(buildQueries()[0]).toEqual({ page: '1', pageSize: '25', sort: '-createdAt' });
  });

  it('writes sorting, filtering and paging to the URL and refetches with it', async () => {
    const { buildQueries } = setup();
    const { router } = renderApp('/projects/kestrel-buds/builds');
    const user = userEvent.setup();
    await screen.findByRole('table', { name: 'Builds' });
    const search = () => Object.fromEntries(new URLSearchParams(router.state.location.search));

    // The router renders a new location in a transition; wait for the page to show it.
    const branchSort = () => screen.getByRole('columnheader', { name: /Branch/ }).getAttribute('aria-sort');
    await user.click(screen.getByRole('button', { name: /^Branch/ }));
    expect(search()).toEqual({ sort: 'branch' });
    await waitFor(() => expect(branchSort()).toBe('ascending'));
    await user.click(screen.getByRole('button', { name: /^Branch/ }));
    expect(search()).toEqual({ sort: '-branch' });
    await waitFor(() => expect(branchSort()).toBe('descending'));

    await user.click(screen.getByRole('button', { name: 'Next' }));
    expect(search()).toEqual({ sort: '-branch', page: '2' });
    await screen.findByText((_, element) => element?.textContent === 'Page 2 of 3');

    // A filter starts again at page 1.
    await user.selectOptions(screen.getByLabelText('Status'), 'fail');
    expect(search()).toEqual({ sort: '-branch', status: 'fail' });
    await waitFor(() => expect(screen.getByLabelText('Status')).toHaveProperty('value', 'fail'));
    await user.selectOptions(screen.getByLabelText('Target'), 'evt2-48k');
    expect(search()).toEqual({ sort: '-branch', status: 'fail', target: 'evt2-48k' });

    await waitFor(() => expect(screen.getByLabelText('Target')).toHaveProperty('value', 'evt2-48k'));
    await user.type(screen.getByLabelText('Commit SHA'), '5C0E{Enter}');
    await waitFor(() => expect(search()).toEqual({ sort: '-branch', status: 'fail', target: 'evt2-48k', sha: '5c0e' }));

    await waitFor(() =>
      expect(buildQueries().at(-1)).toEqual({ page: '1', pageSize: '25', sort: '-branch', status: 'fail', target: 'evt2-48k', sha: '5c0e' }),
    );
    const sorts = buildQueries().map((query) => `${query.sort}:${query.page}`);
    expect(sorts).toContain('branch:1');
    expect(sorts).toContain('-branch:2');

    // Back restores the previous table state from history.
    await user.click(await screen.findByRole('button', { name: 'Clear filters' }));
    expect(search()).toEqual({ sort: '-branch' });
    router.navigate(-1);
    await waitFor(() => expect(search()).toEqual({ sort: '-branch', status: 'fail', target: 'evt2-48k', sha: '5c0e' }));
  });

  it('opens the build page when a row is clicked', async () => {
    setup();
    const { router } = renderApp('/projects/kestrel-buds/builds');
    const user = userEvent.setup();
    const table = await screen.findByRole('table', { name: 'Builds' });
    await user.click(within(table).getAllByRole('row')[2]!.querySelector('td:last-child')!);
    expect(router.state.location.pathname).toBe('/projects/kestrel-buds/builds/5c0e9b1f7a2d3c4b5a69788796a5b4c3d2e1f0a9');
  });

  it('shows the navigation for the project', async () => {
    setup();
    renderApp('/projects/kestrel-buds/builds');
    const nav = await screen.findByRole('navigation', { name: 'Main' });
    expect(within(nav).getByRole('link', { name: 'Builds' }).getAttribute('href')).toBe('/projects/kestrel-buds/builds');
    expect(within(nav).getByRole('link', { name: 'Findings' }).getAttribute('href')).toBe('/projects/kestrel-buds/findings');
    // Tokens are for administrators only.
    expect(within(nav).queryByRole('link', { name: 'API tokens' })).toBeNull();
  });
});
