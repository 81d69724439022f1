import type { CurrentUser, FindingRow, ProjectOverview } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { json, kestrel, mockApi, qaUser, seedSession } from './mock-api';
import { renderApp } from './render-app';

// The capture page (another feature, with its plotting library) is not under test here.
vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const SHA = (c: string) => c.repeat(40);

const overview: ProjectOverview = {
  mainBranch: 'main',
  main: { sha: SHA('d'), status: 'fail', createdAt: '2026-11-05T09:00:00.000Z', counts: { pass: 3, fail: 1, error: 0, pending: 0, waived: 0 } },
  branches: [
    {
      branch: 'main',
      builds: 4,
      latest: { sha: SHA('d'), status: 'fail', createdAt: '2026-11-05T09:00:00.000Z' },
      marks: [
        { sha: SHA('a'), status: 'pass', createdAt: '2026-11-01T09:00:00.000Z' },
        { sha: SHA('b'), status: 'pass', createdAt: '2026-11-02T09:00:00.000Z' },
        { sha: SHA('c'), status: 'fail', createdAt: '2026-11-03T09:00:00.000Z' },
        { sha: SHA('d'), status: 'fail', createdAt: '2026-11-05T09:00:00.000Z' },
      ],
    },
    { branch: 'feature/limiter', builds: 1, latest: { sha: SHA('f'), status: 'error', createdAt: '2026-11-04T09:00:00.000Z' }, marks: [{ sha: SHA('f'), status: 'error', createdAt: '2026-11-04T09:00:00.000Z' }] },
  ],
  failing: [
    {
      testCase: 'eq.music.sweep', target: 'evt2-48k', checkId: 'response', label: 'Passband', kind: 'magnitude-envelope',
      margin: -0.8319, unit: 'dB', worstHz: 7986.3, captureId: 'cap-1',
      latest: { sha: SHA('d'), createdAt: '2026-11-05T09:00:00.000Z' }, since: { sha: SHA('c'), createdAt: '2026-11-03T09:00:00.000Z' }, streak: 2,
    },
  ],
  drifting: [{ testCase: 'level.tone.997', target: 'evt2-48k', checkId: 'level', unit: 'dBFS', bestMargin: 2.5, bestSha: SHA('a'), latestMargin: 0.4, latestSha: SHA('d'), shrinkDb: 2.1, thresholdDb: 1, builds: 4 }],
  awaiting: [{ kind: 'waiver', id: 'w1', testCase: 'eq.music.sweep', subject: 'response', requestedBy: 'eli@fernwick.test', requestedAt: '2026-11-05T10:00:00.000Z' }],
  counts: { awaitingYou: 1, openFindingsOnMain: 3 },
};

const finding: FindingRow = {
  id: '00000000-0000-4000-8000-000000000901',
  // Old stored wording; the page renders the name from the fields instead.
  title: 'response: margin -0.832 dB at 7986 Hz',
  checkId: 'response', checkKind: 'magnitude-envelope', checkLabel: 'Passband',
  state: 'open', testCase: 'eq.music.sweep', target: 'evt2-48k', buildSha: SHA('d'), captureId: 'cap-1', assignee: null,
  margin: -0.8319, unit: 'dB', worstHz: 7986.3, commentCount: 0, createdAt: '2026-11-03T09:00:00.000Z', updatedAt: '2026-11-05T09:00:00.000Z',
  branch: 'main', firstSeen: { sha: SHA('c'), createdAt: '2026-11-03T09:00:00.000Z' }, occurrences: 2, failingSince: { sha: SHA('c'), createdAt: '2026-11-03T09:00:00.000Z' },
};

function setup(user: CurrentUser = qaUser) {
  seedSession();
  return mockApi({
    'GET /api/me': () => json(user),
    'GET /api/projects/kestrel-buds': () => json(kestrel),
    'GET /api/projects/kestrel-buds/overview': () => json(overview),
    'GET /api/projects/kestrel-buds/subscription': () => json({ buildFailures: false }),
    'GET /api/projects/kestrel-buds/findings': () => json({ items: [finding], total: 1, page: 1, pageSize: 50 }),
    'GET /api/projects/kestrel-buds/members': () => json({ items: [] }),
    'GET /api/projects/kestrel-buds/targets': () => json({ items: [] }),
    'GET /api/projects/kestrel-buds/test-cases': () => json({ items: [] }),
  });
}

describe('project overview', () => {
  it("answers whether main is green, what fails since which build, the branches' trends, drift and what awaits the viewer", async () => {
    setup();
    renderApp('/projects/kestrel-buds');

    const latest = await screen.findByRole('region', { name: /Latest on main/ });
    expect(within(latest).getByText('Fail')).toBeTruthy();
    expect(within(latest).getByRole('link', { name: 'dddddddd'.slice(0, 7) }).getAttribute('href')).toBe(`/projects/kestrel-buds/builds/${SHA('d')}`);
    expect(within(latest).getByRole('link', { name: /3 open findings on main/ }).getAttribute('href')).toBe('/projects/kestrel-buds/findings');

    const failing = screen.getByRole('region', { name: /Failing on main now/ });
    expect(within(failing).getByRole('link', { name: 'Passband (magnitude envelope)' }).getAttribute('href')).toBe(`/projects/kestrel-buds/builds/${SHA('d')}/captures/cap-1`);
    expect(failing.textContent).toContain('−0.83 dB at 7.99 kHz');
    expect(within(failing).getByRole('link', { name: 'ccccccc' }).getAttribute('href')).toBe(`/projects/kestrel-buds/builds/${SHA('c')}`);
    expect(failing.textContent).toContain('2 builds');

    const branches = screen.getByRole('region', { name: 'Branches' });
    const mainMarks = within(branches).getByRole('list', { name: 'Last 4 builds of main, oldest first' });
    expect(within(mainMarks).getAllByRole('link').map((a) => a.getAttribute('aria-label'))).toEqual([
      'Build aaaaaaa: Pass', 'Build bbbbbbb: Pass', 'Build ccccccc: Fail', 'Build ddddddd: Fail',
    ]);
    expect(within(branches).getByRole('link', { name: 'feature/limiter' }).getAttribute('href')).toBe('/projects/kestrel-buds/builds?branch=feature%2Flimiter');

    expect(screen.getByRole('region', { name: /Drift/ }).textContent).toContain('+2.50 dB');
    const awaiting = screen.getByRole('region', { name: /Awaiting your decision/ });
    expect(awaiting.textContent).toContain('Waiver request');
    expect(awaiting.textContent).toContain('by eli@fernwick.test');

    // The menu carries the same counts: open findings on main, decisions awaiting the viewer.
    const nav = screen.getByRole('navigation', { name: 'Main' });
    const count = (name: string) => within(nav).getByRole('link', { name }).querySelector('[data-nav-count]')?.textContent;
    expect(count('Findings')).toBe('3');
    expect(count('Approvals')).toBe('1');
  });

  it('tells a viewer who decides nothing so, instead of an empty list', async () => {
    setup({ ...qaUser, memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'viewer' }] });
    renderApp('/projects/kestrel-buds');
    const awaiting = await screen.findByRole('region', { name: /Awaiting your decision/ });
    expect(awaiting.textContent).toContain('QA managers decide mask reviews and waiver requests');
  });
});

describe('findings triage', () => {
  it('shows branch, failing since, occurrences and a name rendered from the fields; filters by branch', async () => {
    const api = setup();
    const { router } = renderApp('/projects/kestrel-buds/findings');
    const table = await screen.findByRole('table', { name: 'Findings' });
    const headers = within(table).getAllByRole('columnheader').map((h) => h.textContent);
    expect(headers.slice(1, 3)).toEqual(['Finding', 'State']);
    expect(headers).toEqual(expect.arrayContaining(['Branch', 'History', 'Margin']));

    const row = within(table).getAllByRole('row')[1]!;
    expect(within(row).getByRole('link', { name: 'Passband (magnitude envelope)' })).toBeTruthy();
    expect(row.textContent).not.toContain('-0.832');
    expect(row.textContent).toContain('−0.83 dB at 7.99 kHz');
    expect(row.querySelector('[data-failing-since]')?.getAttribute('data-failing-since')).toBe(SHA('c'));
    expect(row.querySelector('[data-occurrences]')?.textContent).toMatch(/^2 builds, first\s*ccccccc$/);
    expect(row.textContent).toContain('main');

    const user = userEvent.setup();
    const branch = screen.getByLabelText('Branch');
    expect(branch).toHaveProperty('value', 'main');
    // The branches come with the overview (main first, then by their newest build).
    await waitFor(() => expect(within(branch).getAllByRole('option').map((o) => o.textContent)).toEqual(['main', 'feature/limiter', 'Any branch']));
    await user.selectOptions(branch, 'feature/limiter');
    expect(new URLSearchParams(router.state.location.search).get('branch')).toBe('feature/limiter');
    await waitFor(() => expect(api.requests.filter((r) => r.path.endsWith('/findings')).at(-1)?.search).toContain('branch=feature%2Flimiter'));
    await user.selectOptions(screen.getByLabelText('Branch'), '*');
    await waitFor(() => expect(api.requests.filter((r) => r.path.endsWith('/findings')).at(-1)?.search).not.toContain('branch='));
  });
});

describe('the menu at phone width', () => {
  it('opens as a drawer from the Menu button and closes on Escape and when the page changes', async () => {
    setup();
    const { router } = renderApp('/projects/kestrel-buds');
    const menu = await screen.findByRole('button', { name: 'Menu' });
    const drawer = document.getElementById('main-nav-drawer')!;
    expect(menu.getAttribute('aria-expanded')).toBe('false');
    expect(drawer.className).toContain('hidden');
    const user = userEvent.setup();
    await user.click(menu);
    expect(menu.getAttribute('aria-expanded')).toBe('true');
    expect(drawer.hasAttribute('data-open')).toBe(true);
    await user.keyboard('{Escape}');
    expect(menu.getAttribute('aria-expanded')).toBe('false');
    await user.click(menu);
    await user.click(within(screen.getByRole('navigation', { name: 'Main' })).getByRole('link', { name: 'Findings' }));
    await waitFor(() => expect(router.state.location.pathname).toBe('/projects/kestrel-buds/findings'));
    await waitFor(() => expect(menu.getAttribute('aria-expanded')).toBe('false'));
  });
});
