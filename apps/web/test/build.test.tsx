import type { BuildMatrix, BuildSummary, CurrentUser } from '@earmark/contracts';
import { screen, within } from '@testing-library/react';
import { describe, expect, it, vi } from 'vitest';
import { json, mockApi, problem, seedSession } from './mock-api';
import { renderApp } from './render-app';

// The capture page (another feature, with its plotting library) is not under test here.
vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const viewer: CurrentUser = {
  id: '00000000-0000-4000-8000-000000000009',
  email: 'rel@fernwick.test',
  displayName: 'Release Desk',
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'viewer' }],
};

const SHA = 'a81d44c09e2f7b3c1d5e6f708192a3b4c5d6e7f8';
const PREV = '9e7d6c5b4a39281706f5e4d3c2b1a09f8e7d6c5b';

function summary(sha: string, overrides: Partial<BuildSummary> = {}): BuildSummary {
  return {
    id: `b-${sha}`,
    projectKey: 'kestrel-buds',
    sha,
    label: null,
    branch: 'main',
    pipelineUrl: null,
    status: 'fail',
    createdAt: '2025-06-10T08:00:00.000Z',
    captureCount: 4,
    counts: { pass: 2, fail: 1, error: 1, pending: 0 },
    ...overrides,
  };
}

const failing = {
  id: 'chk-1',
  kind: 'magnitude_envelope',
  label: 'response',
  pass: false,
  measured: -4.3,
  limit: -3,
  margin: -1.3,
  unit: 'dB',
  worstHz: 8000,
};

const matrix: BuildMatrix = {
  build: summary(SHA, { label: 'nightly', pipelineUrl: 'https://ci.example.test/p/1' }),
  testCases: [
    { key: 'eq.music.sweep', name: 'Music EQ sweep' },
    { key: 'level.sine.1k', name: 'Level 1 kHz' },
  ],
  targets: [
    { key: 'evt2-48k', name: 'EVT2 48 kHz' },
    { key: 'host-sim', name: 'Host simulation' },
  ],
  cells: [
    { testCase: 'eq.music.sweep', target: 'evt2-48k', captureId: 'cap-1', outcome: 'fail', failing: [failing, { ...failing, id: 'chk-2', margin: -0.2 }], previous: 'pass' },
    { testCase: 'eq.music.sweep', target: 'host-sim', captureId: 'cap-2', outcome: 'pass', failing: [], previous: 'pass' },
    { testCase: 'level.sine.1k', target: 'evt2-48k', captureId: 'cap-3', outcome: 'error', failing: [], previous: 'error', reason: 'The stored capture cannot be read: storage outage' },
  ],
  compared: summary(PREV, { status: 'pass' }),
};

function cell(testCase: string, target: string): HTMLElement {
  const table = screen.getByRole('table', { name: 'Build matrix' });
  const found = table.querySelector<HTMLElement>(`td[data-testcase="${testCase}"][data-target="${target}"]`);
  if (!found) throw new Error(`no cell ${testCase} × ${target}`);
  return found;
}

describe('build page', () => {
  it('renders the matrix with outcomes, the worst failing check and what changed since the compared build', async () => {
    seedSession();
    mockApi({
      'GET /api/me': () => json(viewer),
      [`GET /api/projects/kestrel-buds/builds/${SHA}/matrix`]: () => json(matrix),
    });
    renderApp(`/projects/kestrel-buds/builds/${SHA}`);

    expect(await screen.findByRole('heading', { name: 'Build a81d44c' })).toBeTruthy();

    const failed = cell('eq.music.sweep', 'evt2-48k');
    expect(failed.textContent).toContain('Fail');
    expect(failed.textContent).toContain('response \u22121.30 dB at 8 kHz');
    expect(failed.textContent).toContain('+1 more failing check');
    expect(within(failed).getByText('was pass')).toBeTruthy();
    expect(within(failed).getByRole('link').getAttribute('href')).toBe(`/projects/kestrel-buds/builds/${SHA}/captures/cap-1`);

    const passed = cell('eq.music.sweep', 'host-sim');
    expect(passed.textContent).toContain('Pass');
    expect(passed.querySelector('[data-changed]')).toBeNull();

    expect(cell('level.sine.1k', 'evt2-48k').textContent).toContain('Error');
    // An error cell says why, in words.
    expect(within(cell('level.sine.1k', 'evt2-48k')).getByTestId('error-reason').textContent).toBe('The stored capture cannot be read: storage outage');
    expect(cell('level.sine.1k', 'host-sim').textContent).toContain('No capture');

    const compare = screen.getByText(/Compared with/);
    expect(within(compare).getByRole('link', { name: '9e7d6c5' }).getAttribute('href')).toBe(`/projects/kestrel-buds/builds/${PREV}`);
    expect(screen.getByRole('link', { name: /Pipeline/ }).getAttribute('href')).toBe('https://ci.example.test/p/1');
    expect(screen.getByRole('button', { name: 'JUnit XML' })).toBeTruthy();
    // Finished builds show no analysis progress.
    expect(screen.queryByRole('progressbar', { name: /captures judged/ })).toBeNull();
  });

  it('shows no pipeline link when the stored URL is not http(s)', async () => {
    seedSession();
    mockApi({
      'GET /api/me': () => json(viewer),
      [`GET /api/projects/kestrel-buds/builds/${SHA}/matrix`]: () => json({ ...matrix, build: { ...matrix.build, pipelineUrl: 'javascript:alert(document.cookie)' } }),
    });
    renderApp(`/projects/kestrel-buds/builds/${SHA}`);

    expect(await screen.findByRole('heading', { name: 'Build a81d44c' })).toBeTruthy();
    expect(screen.queryByText('Pipeline')).toBeNull();
    expect(document.querySelector('a[href^="javascript:"]')).toBeNull();
  });

  it('shows analysis progress while the build is still being judged', async () => {
    seedSession();
    mockApi({
      'GET /api/me': () => json(viewer),
      [`GET /api/projects/kestrel-buds/builds/${SHA}/matrix`]: () =>
        json({
          ...matrix,
          build: summary(SHA, { status: 'running', captureCount: 9, counts: { pass: 4, fail: 1, error: 0, pending: 4 } }),
          compared: null,
        }),
    });
    renderApp(`/projects/kestrel-buds/builds/${SHA}`);

    const progress = await screen.findByRole('progressbar', { name: '5 of 9 captures judged' });
    expect(progress.getAttribute('aria-valuenow')).toBe('5');
    expect(screen.getAllByText('Running').length).toBeGreaterThan(0);
    expect(screen.getByText(/No earlier build to compare with/)).toBeTruthy();
    // Without a compared build nothing is marked as changed.
    expect(document.querySelector('[data-changed]')).toBeNull();
  });

  it("shows the API's problem when the build does not exist", async () => {
    seedSession();
    mockApi({
      'GET /api/me': () => json(viewer),
      [`GET /api/projects/kestrel-buds/builds/${SHA}/matrix`]: () => problem(404, 'Build not found', `There is no build ${SHA} in kestrel-buds.`),
    });
    renderApp(`/projects/kestrel-buds/builds/${SHA}`);
    expect(await screen.findByRole('heading', { name: 'Build not found' })).toBeTruthy();
    expect(screen.getByText(`There is no build ${SHA} in kestrel-buds.`)).toBeTruthy();
  });
});
