import type { CurrentUser, TestCaseDto } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { json, mockApi, seedSession } from './mock-api';
import { renderApp } from './render-app';

vi.mock('@/app/routes/app/capture', () => ({ CaptureRoute: () => null, captureLoader: () => () => null }));

const engineer: CurrentUser = {
  id: 'u-eng',
  email: 'eli@fernwick.test',
  displayName: 'Eli Okafor',
  isAdmin: false,
  memberships: [{ projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'engineer' }],
};

const sweep: TestCaseDto = {
  key: 'eq.sweep',
  name: 'Music EQ sweep',
  description: 'Full-band response',
  stimulus: { kind: 'sweep', sampleRate: 48000, channels: 2, seconds: 5, levelDbfs: -20, from: 20, to: 20000, silenceSeconds: 0, fadeInSeconds: 0, fadeOutSeconds: 0 },
  analysis: {},
  channelMap: [],
  hasCaptures: false,
  createdAt: '2025-05-01T08:00:00.000Z',
  updatedAt: '2025-05-01T08:00:00.000Z',
};

function setup(testCase: TestCaseDto = sweep) {
  seedSession();
  return mockApi({
    'GET /api/me': () => json(engineer),
    'GET /api/projects/kestrel-buds/test-cases': () => json({ items: [testCase] }),
    'PATCH /api/projects/kestrel-buds/test-cases/eq.sweep': (request) => json({ ...testCase, ...(request.body as object) }),
    'POST /api/projects/kestrel-buds/test-cases': (request) => json({ ...sweep, ...(request.body as object) }, 201),
    'GET /api/projects/kestrel-buds/test-cases/eq.sweep/stimulus.wav': () => new Response(new Uint8Array([82, 73, 70, 70]), { headers: { 'Content-Type': 'audio/wav' } }),
  });
}

describe('test cases page', () => {
  it('lists test cases with the loudness caution beside the download', async () => {
    const api = setup();
    const createObjectURL = vi.fn(() => 'blob:stimulus');
    vi.stubGlobal('URL', Object.assign(URL, { createObjectURL, revokeObjectURL: vi.fn() }));
    // jsdom cannot follow a download link; the file hand-off itself is lib/download's business.
    const clicked = vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(() => undefined);
    renderApp('/projects/kestrel-buds/test-cases');
    const user = userEvent.setup();

    expect(await screen.findByRole('heading', { name: 'Test cases' })).toBeTruthy();
    const table = screen.getByRole('table', { name: 'Test cases' });
    expect(within(table).getByText('Sweep 20 Hz–20 kHz, 5 s, −20 dBFS · 48 kHz')).toBeTruthy();
    expect(within(table).getByRole('link', { name: 'eq.sweep' }).getAttribute('href')).toBe('/projects/kestrel-buds/test-cases/eq.sweep/masks');

    const download = within(table).getByRole('button', { name: 'Download stimulus WAV of eq.sweep' });
    const caution = document.getElementById(download.getAttribute('aria-describedby') ?? '');
    expect(caution?.textContent).toContain('Test signals can be loud');
    expect(caution?.textContent).toContain('start at a low level');
    await user.click(download);
    await waitFor(() => expect(api.requests.find((r) => r.path.endsWith('/stimulus.wav'))?.authorization).toBe('Bearer access-1'));
    await waitFor(() => expect(clicked).toHaveBeenCalled());
  });

  it('validates the stimulus by kind with the contract and posts what was typed', async () => {
    const api = setup();
    renderApp('/projects/kestrel-buds/test-cases');
    const user = userEvent.setup();

    await user.click(await screen.findByRole('button', { name: 'New test case' }));
    const dialog = screen.getByRole('dialog', { name: 'New test case' });
    await user.type(within(dialog).getByLabelText('Key'), 'thd.1k');
    await user.type(within(dialog).getByLabelText('Name'), 'THD at 1 kHz');
    await user.selectOptions(within(dialog).getByLabelText('Signal'), 'sine');
    const rate = within(dialog).getByLabelText(/^Sample rate/);
    await user.clear(rate);
    await user.type(rate, '8000');
    await user.type(within(dialog).getByLabelText(/^Frequency/), '5000');
    await user.click(within(dialog).getByRole('button', { name: 'Create test case' }));

    const frequency = within(dialog).getByLabelText(/^Frequency/);
    expect(frequency.getAttribute('aria-invalid')).toBe('true');
    expect(within(dialog).getByText('frequency must be below half the sample rate (the Nyquist frequency)')).toBeTruthy();
    expect(api.requests.some((r) => r.method === 'POST')).toBe(false);

    await user.clear(frequency);
    await user.type(frequency, '997');
    await user.click(within(dialog).getByRole('button', { name: 'Create test case' }));
    await waitFor(() =>
      expect(api.requests.find((r) => r.method === 'POST')?.body).toEqual({
        key: 'thd.1k',
        name: 'THD at 1 kHz',
        description: '',
        stimulus: { kind: 'sine', sampleRate: 8000, seconds: 5, levelDbfs: -20, frequency: 997 },
        analysis: {},
        channelMap: [],
      }),
    );
    await waitFor(() => expect(screen.queryByRole('dialog')).toBeNull());
  });

  it('explains that settings of a test case with captures are reviewed with a mask revision, and saves only its name and description', async () => {
    const api = setup({ ...sweep, channelMap: [0, 1], hasCaptures: true });
    renderApp('/projects/kestrel-buds/test-cases');
    const user = userEvent.setup();

    await user.click(await screen.findByRole('button', { name: 'Edit eq.sweep' }));
    const dialog = screen.getByRole('dialog', { name: 'Edit eq.sweep' });
    const note = within(dialog).getByRole('note', { name: 'Settings under review' });
    expect(note.textContent).toContain('Captures of this test case exist, so its stimulus, analysis settings and channel map are under review');
    expect(note.textContent).toContain('Draft a mask revision with the new settings; they come into force when a QA manager approves it.');
    expect(within(note).getByRole('link', { name: 'Open the masks of eq.sweep' }).getAttribute('href')).toBe('/projects/kestrel-buds/test-cases/eq.sweep/masks');
    // Inside a disabled fieldset: disabled for the user, though the element's own attribute is unset.
    expect(within(dialog).getByLabelText('Signal').matches(':disabled')).toBe(true);
    expect(within(dialog).getByLabelText(/^Channels to analyse/).matches(':disabled')).toBe(true);
    expect(within(dialog).getByLabelText('Name').matches(':disabled')).toBe(false);
    // The stimulus stays downloadable.
    expect(within(dialog).getByRole('button', { name: /Download stimulus WAV/ }).matches(':disabled')).toBe(false);

    const name = within(dialog).getByLabelText('Name');
    await user.clear(name);
    await user.type(name, 'Music EQ sweep, both ears');
    await user.click(within(dialog).getByRole('button', { name: 'Save test case' }));
    await waitFor(() => expect(api.requests.find((r) => r.method === 'PATCH')?.body).toEqual({ name: 'Music EQ sweep, both ears', description: 'Full-band response' }));
  });

  it('lets the settings of a test case without captures be edited directly', async () => {
    const api = setup();
    renderApp('/projects/kestrel-buds/test-cases');
    const user = userEvent.setup();

    await user.click(await screen.findByRole('button', { name: 'Edit eq.sweep' }));
    const dialog = screen.getByRole('dialog', { name: 'Edit eq.sweep' });
    expect(within(dialog).queryByRole('note', { name: 'Settings under review' })).toBeNull();
    await user.type(within(dialog).getByLabelText(/^Channels to analyse/), '1');
    await user.click(within(dialog).getByRole('button', { name: 'Save test case' }));
    await waitFor(() => expect(api.requests.find((r) => r.method === 'PATCH')?.body).toMatchObject({ channelMap: [1], analysis: {} }));
  });
});
