import type { BuildMatrix, BuildsPage, CurrentUser, DeriveMaskResponse, MaskDiff, MaskRevisionDto, TestCaseDto } from '@earmark/contracts';
import { fireEvent, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { json, mockApi, seedSession } from './mock-api';
import { renderApp } from './render-app';

vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));
// uPlot needs a canvas; the figure's name and data are what matter here.
vi.mock('@/components/plot-figure', () => ({
  PlotFigure: ({ label, data }: { label: string; data: unknown[] }) => (
    <figure aria-label={label} data-series={data.length} data-upper={JSON.stringify(data[3] ?? null)} />
  ),
}));

const engineer: CurrentUser = {
  id: 'u-eng',
  email: 'eli@fernwick.test',
  displayName: 'Eli Okafor',
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'engineer' }],
};

const testCase: TestCaseDto = {
  key: 'eq.sweep',
  name: 'Music EQ sweep',
  description: '',
  stimulus: { kind: 'sweep', sampleRate: 48000, channels: 2, seconds: 5, levelDbfs: -20, from: 20, to: 20000, silenceSeconds: 0, fadeInSeconds: 0, fadeOutSeconds: 0 },
  analysis: {},
  channelMap: [],
  hasCaptures: true,
  createdAt: '2025-05-01T08:00:00.000Z',
  updatedAt: '2025-05-01T08:00:00.000Z',
};

const revision = (n: number, state: MaskRevisionDto['state'], extra: Partial<MaskRevisionDto> = {}): MaskRevisionDto => ({
  id: `00000000-0000-4000-8000-00000000010${n}`,
  testCase: 'eq.sweep',
  target: null,
  revision: n,
  state,
  checks: [
    {
      kind: 'magnitude-envelope',
      id: 'eq-response',
      measure: 'transfer',
      smoothing: 6,
      upper: [
        { hz: 20, db: 1 },
        { hz: 20000, db: 1 },
      ],
      lower: [
        { hz: 20, db: -1 },
        { hz: 20000, db: -1 },
      ],
    },
  ],
  note: '',
  author: 'eli@fernwick.test',
  reviewer: null,
  contributors: ['eli@fernwick.test'],
  createdAt: '2025-06-01T08:00:00.000Z',
  decidedAt: null,
  submittedAt: null,
  decisionComment: null,
  basedOn: null,
  settings: { stimulus: testCase.stimulus, analysis: {}, channelMap: [] },
  ...extra,
});

const captureA = '00000000-0000-4000-8000-00000000a001';
const captureB = '00000000-0000-4000-8000-00000000a002';
const sha = 'a'.repeat(40);

const summary = { id: 'b-1', projectKey: 'kestrel-buds', captureCount: 2, sha, label: 'nightly', branch: 'main', pipelineUrl: null, status: 'pass', createdAt: '2025-06-02T08:00:00.000Z', counts: { pass: 2, fail: 0, error: 0, pending: 0 } };

function setup(revisions: MaskRevisionDto[], extra: Parameters<typeof mockApi>[0] = {}) {
  seedSession();
  let list = revisions;
  const api = mockApi({
    ...extra,
    'GET /api/me': () => json(engineer),
    'GET /api/projects/kestrel-buds/test-cases/eq.sweep': () => json(testCase),
    'GET /api/projects/kestrel-buds/test-cases/eq.sweep/masks': () => json({ items: list }),
    'GET /api/projects/kestrel-buds/targets': () => json({ items: [] }),
    'GET /api/projects/kestrel-buds/builds': () => json({ items: [summary], total: 1, page: 1, pageSize: 12 } as unknown as BuildsPage),
    [`GET /api/projects/kestrel-buds/builds/${sha}/matrix`]: () =>
      json({
        build: summary,
        testCases: [{ key: 'eq.sweep', name: 'Music EQ sweep' }],
        targets: [
          { key: 'rev-a', name: 'Rev A' },
          { key: 'rev-b', name: 'Rev B' },
        ],
        cells: [
          { testCase: 'eq.sweep', target: 'rev-a', captureId: captureA, outcome: 'pass', failing: [], previous: null },
          { testCase: 'eq.sweep', target: 'rev-b', captureId: captureB, outcome: 'pass', failing: [], previous: null },
        ],
        compared: null,
      } as unknown as BuildMatrix),
    [`GET /api/projects/kestrel-buds/captures/${captureA}/plot`]: () =>
      json({
        channel: 0,
        checkId: 'eq-response',
        unit: 'dB',
        spectrum: { hz: [20, 200, 2000, 20000], min: [-0.5, 0, 0.1, -0.4], max: [-0.3, 0.2, 0.3, -0.2] },
        upper: null,
        lower: null,
        failingRegions: [],
        worst: null,
        overlay: null,
        phase: null,
        groupDelay: null,
        waveform: { seconds: [0, 1], min: [-0.1, -0.1], max: [0.1, 0.1] },
        engineVersion: 'test',
      }),
    'PATCH /api/projects/kestrel-buds/test-cases/eq.sweep/masks/2': (request) => {
      const body = request.body as { checks: MaskRevisionDto['checks']; note: string; settings?: Partial<MaskRevisionDto['settings']> };
      list = list.map((r) => (r.revision === 2 ? { ...r, checks: body.checks, note: body.note, settings: { ...r.settings, ...body.settings } } : r));
      return json(list.find((r) => r.revision === 2));
    },
    'POST /api/projects/kestrel-buds/test-cases/eq.sweep/masks/2/submit': () => {
      list = list.map((r) => (r.revision === 2 ? { ...r, state: 'in_review', submittedAt: '2025-06-03T08:00:00.000Z' } : r));
      return json(list.find((r) => r.revision === 2));
    },
    'POST /api/projects/kestrel-buds/test-cases/eq.sweep/masks/derive': () =>
      json({
        check: {
          kind: 'magnitude-envelope',
          id: 'derived-envelope',
          measure: 'transfer',
          upper: [
            { hz: 20, db: 1.4 },
            { hz: 20000, db: 1.2 },
          ],
          lower: [
            { hz: 20, db: -1.5 },
            { hz: 20000, db: -1.1 },
          ],
        },
        stats: {
          captures: 2,
          channel: 0,
          unit: 'dB',
          hz: [20, 2000, 20000],
          mean: [0, 0.1, 0],
          std: [0.1, 0.1, 0.1],
          upperRaw: [0.8, 0.9, 0.8],
          lowerRaw: [-0.8, -0.7, -0.8],
          pointsUsed: 900,
          maxDeviationDb: { upper: 0.42, lower: 0.31, overall: 0.42 },
          maxStrayDb: 0,
          worstGoldenMarginDb: 0.61,
        },
        derivation: {
          captureIds: [captureA, captureB],
          k: 2.5,
          guardDb: 0.5,
          maxSegments: 8,
          smoothing: 12,
          referenceHz: 1000,
          measure: 'transfer',
          channel: 0,
          bandHz: [20, 20000],
          engineVersion: 'test',
          maxDeviationDb: 0.42,
          derivedAt: '2025-06-03T08:00:00.000Z',
        },
        outliers: [],
        warnings: [],
      } satisfies DeriveMaskResponse),
  });
  return api;
}

describe('masks page', () => {
  it('lists revisions with their states and shows schema messages under the cell their path names', async () => {
    setup([revision(2, 'draft'), revision(1, 'approved', { reviewer: 'qa@fernwick.test', decidedAt: '2025-06-01T09:00:00.000Z' })]);
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks');
    const user = userEvent.setup();

    expect(await screen.findByRole('heading', { name: 'Masks — eq.sweep' })).toBeTruthy();
    const revisions = screen.getByRole('table', { name: 'Mask revisions' });
    expect(within(revisions).getByText('Approved')).toBeTruthy();
    expect(within(revisions).getByText('qa@fernwick.test')).toBeTruthy();

    const editor = screen.getByRole('table', { name: 'Checks editor' });
    const hz = within(editor).getByRole('textbox', { name: 'Upper limit of check 1 point 2 frequency (Hz)' });
    await user.clear(hz);
    await user.type(hz, '10');
    const message = editor.querySelector('[data-issue-path="checks.0.upper.1.hz"]');
    expect(message?.textContent).toContain('frequencies must strictly increase (10 Hz follows 20 Hz)');
    expect((screen.getByRole('button', { name: 'Save draft' }) as HTMLButtonElement).disabled).toBe(true);

    const id = within(editor).getByRole('textbox', { name: 'Id of check 1' });
    await user.clear(id);
    await user.type(id, 'Bad Id');
    expect(editor.querySelector('[data-issue-path="checks.0.id"]')?.textContent).toContain('must be a slug');

    // Another check with the same id is refused at its own path.
    await user.clear(id);
    await user.type(id, 'level');
    await user.click(screen.getByRole('button', { name: 'Add check' }));
    expect(within(editor).getAllByRole('textbox', { name: /^Id of check/ })).toHaveLength(2);
    await user.selectOptions(screen.getByLabelText('Kind of check'), 'level');
    await user.click(screen.getByRole('button', { name: 'Add check' }));
    const third = within(editor).getByRole('textbox', { name: 'Id of check 3' });
    expect((third as HTMLInputElement).value).toBe('level-2');
    fireEvent.change(third, { target: { value: 'level' } });
    expect(editor.querySelector('[data-issue-path="checks.2.id"]')?.textContent).toContain('duplicate check id "level"');
  });

  it('saves a draft with PATCH and submits it for review', async () => {
    const api = setup([revision(2, 'draft')]);
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=2');
    const user = userEvent.setup();

    const editor = await screen.findByRole('table', { name: 'Checks editor' });
    const db = within(editor).getByRole('textbox', { name: 'Upper limit of check 1 point 2 level (dB)' });
    await user.clear(db);
    await user.type(db, '1.5');
    // The preview follows the edit: the upper limit at the last column is the new breakpoint.
    await waitFor(() => expect(JSON.parse(screen.getByRole('figure', { name: 'Limit preview' }).getAttribute('data-upper') ?? '[]').at(-1)).toBe(1.5));

    await user.type(screen.getByRole('textbox', { name: 'Note' }), 'Allow the tweeter peak');
    await user.click(screen.getByRole('button', { name: 'Save draft' }));
    await waitFor(() => expect(api.requests.some((r) => r.method === 'PATCH')).toBe(true));
    const patch = api.requests.find((r) => r.method === 'PATCH')!;
    expect(patch.body).toEqual({
      checks: [
        {
          kind: 'magnitude-envelope',
          id: 'eq-response',
          measure: 'transfer',
          smoothing: 6,
          upper: [
            { hz: 20, db: 1 },
            { hz: 20000, db: 1.5 },
          ],
          lower: [
            { hz: 20, db: -1 },
            { hz: 20000, db: -1 },
          ],
        },
      ],
      note: 'Allow the tweeter peak',
      target: null,
    });

    await user.click(await screen.findByRole('button', { name: 'Submit for review' }));
    await waitFor(() => expect(api.requests.some((r) => r.method === 'POST' && r.path.endsWith('/masks/2/submit'))).toBe(true));
    expect(api.requests.find((r) => r.path.endsWith('/submit'))?.body).toBeUndefined();
    expect(await screen.findAllByText('In review')).not.toHaveLength(0);
  });

  it('shows someone else’s draft read-only, without Save or Submit, and says who can change it', async () => {
    const api = setup([revision(2, 'draft', { author: 'dana@fernwick.test', contributors: ['dana@fernwick.test'] })]);
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=2');

    expect(await screen.findByRole('heading', { name: 'Revision 2' })).toBeTruthy();
    expect(screen.getByRole('note').textContent).toBe('Only its author, dana@fernwick.test, can change or submit this draft. Copy it to a draft of your own to propose other limits.');
    expect(screen.queryByRole('button', { name: 'Save draft' })).toBeNull();
    expect(screen.queryByRole('button', { name: 'Submit for review' })).toBeNull();
    expect(screen.queryByRole('textbox', { name: 'Note' })).toBeNull();
    const editor = screen.getByRole('table', { name: 'Checks editor' });
    expect((within(editor).getByRole('textbox', { name: 'Upper limit of check 1 point 2 level (dB)' }) as HTMLInputElement).readOnly).toBe(true);
    expect(screen.queryByRole('button', { name: 'Add check' })).toBeNull();
    // Copying is the way to propose other limits.
    expect(screen.getByRole('button', { name: 'Copy to new draft' })).toBeTruthy();
    expect(api.requests.some((r) => r.method !== 'GET')).toBe(false);
  });

  it('derives limits from chosen captures and puts them into the draft', async () => {
    const api = setup([revision(2, 'draft')]);
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=2');
    const user = userEvent.setup();

    const derive = await screen.findByRole('button', { name: 'Derive from captures' });
    await waitFor(() => expect((derive as HTMLButtonElement).disabled).toBe(false));
    await user.click(derive);
    const dialog = screen.getByRole('dialog', { name: 'Derive limits from golden captures' });
    for (const [label, value] of [
      ['k', '2.5'],
      ['Segment budget', '8'],
    ] as const) {
      const input = within(dialog).getByLabelText(new RegExp(`^${label}`));
      await user.clear(input);
      await user.type(input, value);
    }
    await user.selectOptions(within(dialog).getByLabelText(/^Smoothing/), '12');
    expect((within(dialog).getByRole('button', { name: 'Use as draft' }) as HTMLButtonElement).disabled).toBe(true);
    await user.click(within(dialog).getByRole('button', { name: 'Preview limits' }));

    await waitFor(() => expect(api.requests.some((r) => r.path.endsWith('/masks/derive'))).toBe(true));
    expect(api.requests.find((r) => r.path.endsWith('/masks/derive'))?.body).toEqual({
      captureIds: [captureA, captureB],
      k: 2.5,
      guardDb: 0.5,
      maxSegments: 8,
      smoothing: 12,
    });
    expect(await within(dialog).findByText('0.42 dB')).toBeTruthy();
    expect(within(dialog).getByRole('figure', { name: 'New check preview' })).toBeTruthy();

    // By default the derived check replaces the envelope being previewed and keeps its id.
    await user.click(within(dialog).getByRole('button', { name: 'Use as draft' }));
    const editor = screen.getByRole('table', { name: 'Checks editor' });
    expect((within(editor).getByRole('textbox', { name: 'Id of check 1' }) as HTMLInputElement).value).toBe('eq-response');
    expect((within(editor).getByRole('textbox', { name: 'Upper limit of check 1 point 1 level (dB)' }) as HTMLInputElement).value).toBe('1.4');
    expect(within(editor).queryByRole('textbox', { name: 'Id of check 2' })).toBeNull();
  });

  it('edits the analysis settings and channel map of a draft and saves them with it', async () => {
    const api = setup([revision(2, 'draft')]);
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=2');
    const user = userEvent.setup();

    const settings = await screen.findByRole('region', { name: 'Judging settings' });
    expect(settings.textContent).toContain('sweep 20 Hz–20 kHz · 48 kHz');
    const channels = within(settings).getByLabelText('Channels to analyse');
    await user.type(channels, '9');
    expect(within(settings).getByText('Too big: expected number to be <=7')).toBeTruthy();
    expect((screen.getByRole('button', { name: 'Save draft' }) as HTMLButtonElement).disabled).toBe(true);

    await user.clear(channels);
    await user.type(channels, '1');
    await user.selectOptions(within(settings).getByLabelText('Transfer estimator'), 'h1');
    await user.click(screen.getByRole('button', { name: 'Save draft' }));
    await waitFor(() => expect(api.requests.some((r) => r.method === 'PATCH')).toBe(true));
    expect(api.requests.find((r) => r.method === 'PATCH')?.body).toMatchObject({ settings: { analysis: { transferMethod: 'h1' }, channelMap: [1] } });
  });

  it('shows an approved revision’s settings read-only, with the engine default named', async () => {
    const api = setup([revision(2, 'draft'), revision(1, 'approved', { settings: { stimulus: testCase.stimulus, analysis: { transferBandHz: [100, 10000] }, channelMap: [0] } })]);
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=1');
    const summary = await screen.findByLabelText('Settings this revision judges with');
    expect([...summary.querySelectorAll('dd')].map((d) => d.textContent)).toEqual(['sweep 20 Hz–20 kHz · 48 kHz', 'deconvolution (default), band 100 Hz–10 kHz', '0']);
    expect(screen.queryByLabelText('Channels to analyse')).toBeNull();
    expect(api.requests.some((r) => r.method !== 'GET')).toBe(false);
  });

  it('shows a reviewer the settings a revision changes above its check changes', async () => {
    setup([revision(2, 'in_review', { settings: { stimulus: testCase.stimulus, analysis: {}, channelMap: [1] } }), revision(1, 'approved')], {
      'GET /api/projects/kestrel-buds/test-cases/eq.sweep/masks/2/diff': () =>
        json({
          testCase: 'eq.sweep',
          base: { revision: 1, state: 'approved', target: null },
          head: { revision: 2, state: 'in_review', target: null },
          checks: [],
          summary: { added: 0, removed: 0, changed: 0, unchanged: 1 },
          noteChanged: false,
          targetChanged: false,
          settingsChanges: [
            { path: 'analysis.transferMethod', before: null, after: 'h1' },
            { path: 'channelMap', before: [], after: [1] },
          ],
        } satisfies MaskDiff),
    });
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=2&compare=1');

    const note = await screen.findByRole('note', { name: 'Settings changes' });
    expect(note.textContent).toContain('Judging settings change.');
    const rows = within(note).getAllByRole('row').slice(1).map((row) => within(row).getAllByRole('cell').map((c) => c.textContent));
    expect(rows).toEqual([
      ['analysis.transferMethod', 'default', 'h1'],
      ['channelMap', '[]', '[1]'],
    ]);
  });
});
