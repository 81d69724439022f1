import type { CurrentUser, MaskRevisionDto } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { json, mockApi, seedSession } from './mock-api';
import { renderApp } from './render-app';

vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));
vi.mock('@/components/plot-figure', () => ({ PlotFigure: ({ label }: { label: string }) => <figure aria-label={label} /> }));

/** The mask editor speaks in labels with units, 1/N-octave smoothing, no engine self-test, and guards unsaved edits. */
const engineer: CurrentUser = {
  id: 'u-eng',
  email: 'eli@fernwick.test',
  displayName: 'Eli Okafor',
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'engineer' }],
};

const revision = (n: number, state: MaskRevisionDto['state'], checks: MaskRevisionDto['checks'], author = 'eli@fernwick.test'): MaskRevisionDto => ({
  id: `00000000-0000-4000-8000-00000000011${n}`,
  testCase: 'eq.sweep',
  target: null,
  revision: n,
  state,
  checks,
  note: '',
  author,
  reviewer: null,
  contributors: [author],
  createdAt: '2025-06-01T08:00:00.000Z',
  decidedAt: null,
  submittedAt: null,
  decisionComment: null,
  basedOn: null,
  settings: { stimulus: { kind: 'sine', sampleRate: 48000, channels: 1, seconds: 1, levelDbfs: -20, frequency: 997, fadeInSeconds: 0, fadeOutSeconds: 0 }, analysis: {}, channelMap: [] },
});

type Check = MaskRevisionDto['checks'][number];
const envelope: Check = { kind: 'magnitude-envelope', id: 'eq-response', measure: 'transfer', smoothing: 6, upper: [{ hz: 20, db: 1 }, { hz: 20000, db: 1 }] };
const level: Check = { kind: 'level', id: 'output-level', metric: 'rms-dbfs', min: -21, max: -19 };
const thdn: Check = { kind: 'distortion', id: 'thdn-1k', metric: 'thdn-db', max: -80 };
const parseval: Check = { kind: 'level', id: 'analysis-energy', metric: 'energy-parseval', max: 1e-9 };

function setup(revisions: MaskRevisionDto[]) {
  seedSession();
  return mockApi({
    'GET /api/me': () => json(engineer),
    'GET /api/projects/kestrel-buds/test-cases/eq.sweep/masks': () => json({ items: revisions }),
    'GET /api/projects/kestrel-buds/targets': () => json({ items: [] }),
    'GET /api/projects/kestrel-buds/builds': () => json({ items: [], total: 0, page: 1, pageSize: 12 }),
  });
}

describe('mask editor wording', () => {
  it('shows metrics as labels with units and smoothing as 1/N octave, and never offers the engine self-test', async () => {
    setup([revision(2, 'draft', [envelope, level, thdn])]);
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=2');
    const editor = await screen.findByRole('table', { name: 'Checks editor' });

    const smoothing = within(editor).getByRole('combobox', { name: 'Smoothing of check 1' }) as HTMLSelectElement;
    expect(smoothing.selectedOptions[0]?.textContent).toBe('1/6 octave');
    expect([...smoothing.options].map((o) => o.textContent)).toEqual(['none', '1 octave', '1/3 octave', '1/6 octave', '1/12 octave', '1/24 octave']);

    const metric = within(editor).getByRole('combobox', { name: 'Metric of check 2' }) as HTMLSelectElement;
    expect(metric.selectedOptions[0]?.textContent).toBe('RMS level (dBFS)');
    expect([...metric.options].map((o) => o.textContent)).toEqual(['—', 'RMS level (dBFS)', 'Peak level (dBFS)', 'Crest factor (dB)']);
    expect([...metric.options].some((o) => o.value === 'energy-parseval')).toBe(false);
    // min/max carry the metric's unit.
    expect(within(editor).getByRole('textbox', { name: 'Min (dBFS) of check 2' })).toBeTruthy();
    expect(((within(editor).getByRole('combobox', { name: 'Metric of check 3' }) as HTMLSelectElement).selectedOptions[0])?.textContent).toBe('THD+N (dB)');
    expect(within(editor).getByRole('textbox', { name: 'Max (dB) of check 3' })).toBeTruthy();
    expect(editor.textContent).not.toMatch(/rms-dbfs|thdn-db/);
  });

  it('shows a read-only revision in words, never cut to an input’s width', async () => {
    setup([revision(1, 'approved', [envelope, thdn, parseval], 'dana@fernwick.test')]);
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=1');
    const editor = await screen.findByRole('table', { name: 'Checks editor' });
    expect(within(editor).getByRole('group', { name: 'Smoothing of check 1' }).textContent).toBe('Smoothing1/6 octave');
    expect(within(editor).getByRole('group', { name: 'Metric of check 2' }).textContent).toBe('MetricTHD+N (dB)');
    // A stored mask from before the rule still shows its self-test, named as such.
    expect(within(editor).getByRole('group', { name: 'Metric of check 3' }).textContent).toBe('MetricEngine self-test: energy agreement (ratio)');
    expect(within(editor).queryAllByRole('combobox')).toHaveLength(0);
  });

  it('refuses a self-test in the user’s own draft at its cell, before saving', async () => {
    setup([revision(2, 'draft', [level, parseval])]);
    renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=2');
    const editor = await screen.findByRole('table', { name: 'Checks editor' });
    expect(editor.querySelector('[data-issue-path="checks.1.metric"]')?.textContent).toMatch(/^the engine self-test \(energy agreement\) checks the analysis, not the firmware/);
    expect(((within(editor).getByRole('combobox', { name: 'Metric of check 2' }) as HTMLSelectElement).selectedOptions[0])?.textContent).toBe('Engine self-test: energy agreement (ratio)');
    expect((screen.getByRole('button', { name: 'Submit for review' }) as HTMLButtonElement).disabled).toBe(true);
  });

  it('asks before leaving with unsaved edits, and stays when told to', async () => {
    setup([revision(2, 'draft', [level]), revision(1, 'approved', [level], 'dana@fernwick.test')]);
    const { router } = renderApp('/projects/kestrel-buds/test-cases/eq.sweep/masks?rev=2');
    const user = userEvent.setup();
    const editor = await screen.findByRole('table', { name: 'Checks editor' });
    const max = within(editor).getByRole('textbox', { name: 'Max (dBFS) of check 1' });
    await user.clear(max);
    await user.type(max, '-18');
    expect(screen.getByText('Unsaved changes')).toBeTruthy();

    await user.click(screen.getAllByRole('link', { name: 'Test cases' })[0]!);
    const prompt = await screen.findByRole('dialog', { name: 'Leave without saving?' });
    await user.click(within(prompt).getByRole('button', { name: 'Stay and keep editing' }));
    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
    expect(router.state.location.pathname).toBe('/projects/kestrel-buds/test-cases/eq.sweep/masks');
    expect((within(editor).getByRole('textbox', { name: 'Max (dBFS) of check 1' }) as HTMLInputElement).value).toBe('-18');

    // The browser's own prompt guards closing or reloading the tab.
    const unload = new Event('beforeunload', { cancelable: true });
    window.dispatchEvent(unload);
    expect(unload.defaultPrevented).toBe(true);

    await user.click(screen.getAllByRole('link', { name: 'Test cases' })[0]!);
    await user.click(within(await screen.findByRole('dialog', { name: 'Leave without saving?' })).getByRole('button', { name: 'Leave without saving' }));
    await waitFor(() => expect(router.state.location.pathname).toBe('/projects/kestrel-buds/test-cases'));
  });
});
