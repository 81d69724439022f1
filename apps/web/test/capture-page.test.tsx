import type { CaptureDetail, CapturePlot, CurrentUser, FindingsPage } from '@earmark/contracts';
import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import type { PlotCanvasProps } from '@/features/captures/components/plot-canvas';
import { json, mockApi, problem, seedSession } from './mock-api';
import { renderApp } from './render-app';

// uPlot needs a real canvas; the stub renders the figure, its HTML labels and the props the
// page controls (zoom), so the page around the plots is tested for real.
vi.mock('@/features/captures/components/plot-canvas', () => ({
  PlotCanvas: (props: PlotCanvasProps) => (
    <figure
      aria-label={props.label}
      data-columns={props.data[0]?.length ?? 0}
      data-x-range={props.xRange ? `${Math.round(props.xRange.min)}-${Math.round(props.xRange.max)}` : 'all'}
    >
      {props.children}
    </figure>
  ),
}));

const MINUS = '\u2212';
const projectKey = 'kestrel-buds';
const captureId = '7d1e2c3b-4a59-4e68-9f70-8a9b0c1d2e3f';
const sha = 'a41c9e07b2d38f5e6a1c0b9d8e7f6a5b4c3d2e1f';
const lastPassSha = '3fa9c21d0e8b7a6c5d4e3f2a1b0c9d8e7f6a5b4c';
const base = `/api/projects/${projectKey}/captures/${captureId}`;
const pagePath = `/projects/${projectKey}/builds/${sha}/captures/${captureId}`;

const engineer: CurrentUser = {
  id: 'u-eng',
  email: 'ana@fernwick.test',
  displayName: 'Ana Ferreira',
  isAdmin: false,
  memberships: [{ projectKey, projectName: 'Kestrel Buds', role: 'engineer' }],
};

function detail(overrides: { status?: CaptureDetail['capture']['status']; outcome?: 'pass' | 'fail' | 'error'; reason?: string | null; purgedAt?: string } = {}): CaptureDetail {
  const status = overrides.status ?? 'done';
  const outcome = overrides.outcome ?? 'fail';
  return {
    capture: {
      id: captureId,
      projectKey,
      buildSha: sha,
      testCase: 'eq.music.sweep',
      target: 'evt2-48k',
      status,
      sha256: 'e'.repeat(64),
      sizeBytes: 3_840_044,
      sampleRate: 48_000,
      channels: 2,
      frames: 480_000,
      createdAt: '2025-06-12T14:03:11.000Z',
      purgedAt: overrides.purgedAt ?? null,
      verdict:
        status === 'done'
          ? {
              outcome,
              reason: overrides.reason === undefined ? 'eq-response −1.30 dB @ 8.02 kHz' : overrides.reason,
              engineVersion: '0.2.0',
              maskRevisionId: 'mr-1',
              maskRevision: 1,
              createdAt: '2025-06-12T14:03:13.000Z',
              checks: [
                { id: 'output-level', kind: 'level', label: null, pass: true, measured: -6.12, limit: -7, margin: 0.88, unit: 'dBFS', worstHz: null },
                { id: 'hf-band-level', kind: 'band-levels', label: null, pass: false, measured: 1.42, limit: 0.8, margin: -0.62, unit: 'dB', worstHz: 7943.28 },
                { id: 'latency', kind: 'timing', label: null, pass: true, measured: 3.521, limit: 10, margin: 6.479, unit: 'ms', worstHz: null },
                { id: 'eq-response', kind: 'magnitude-envelope', label: 'Music EQ within ±1 dB', pass: false, measured: 2.3, limit: 1, margin: -1.3, unit: 'dB', worstHz: 8020 },
              ],
            }
          : null,
      links: { self: '/api/v1/x', build: '/api/v1/y', dashboard: '/z' },
    },
    testCase: { key: 'eq.music.sweep', name: 'Music EQ sweep', stimulusKind: 'sweep' },
    target: { key: 'evt2-48k', name: 'EVT2 board, 48 kHz' },
    build: {
      id: 'b-1',
      projectKey,
      sha,
      label: null,
      branch: 'main',
      pipelineUrl: null,
      status: 'fail',
      createdAt: '2025-06-12T13:58:00.000Z',
      captureCount: 14,
      counts: { pass: 12, fail: 2, error: 0, pending: 0 },
    },
    mask: {
      id: 'mask-1',
      revision: 1,
      checks: [
        {
          kind: 'magnitude-envelope',
          id: 'eq-response',
          measure: 'transfer',
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
    },
    findings: [],
    lastPassing: { captureId: 'c-last', buildSha: lastPassSha, createdAt: '2025-06-10T09:12:00.000Z' },
  };
}

function capturePlot(): CapturePlot {
  const hz = [20, 100, 1000, 4000, 8020, 16000, 20000];
  return {
    channel: 0,
    checkId: 'eq-response',
    unit: 'dB',
    spectrum: { hz, min: [0, 0, 0, 0.5, 2.1, 0.2, 0], max: [0.1, 0.1, 0.1, 0.7, 2.3, 0.3, 0.1] },
    upper: [
      { hz: 20, db: 1 },
      { hz: 20000, db: 1 },
    ],
    lower: [
      { hz: 20, db: -1 },
      { hz: 20000, db: -1 },
    ],
    failingRegions: [{ fromHz: 5600, toHz: 11000, worstHz: 8020, worstMargin: -1.3 }],
    worst: { hz: 8020, db: 2.3, margin: -1.3 },
    overlay: { captureId: 'c-last', buildSha: lastPassSha, spectrum: { hz, min: hz.map(() => 0), max: hz.map(() => 0.1) } },
    phase: { hz, deg: [0, -1, -5, -20, -40, -80, -95] },
    groupDelay: { hz, ms: [0.02, 0.02, 0.021, 0.025, 0.03, 0.021, 0.02] },
    waveform: { seconds: [0, 5, 10], min: [-0.5, -0.6, -0.5], max: [0.5, 0.6, 0.5] },
    engineVersion: '0.2.0',
  };
}

const noFindings: FindingsPage = { items: [], total: 0, page: 1, pageSize: 200 };

function commonHandlers(captureResponses: Array<() => Response>) {
  let call = 0;
  return {
    'GET /api/me': () => json(engineer),
    [`GET /api/projects/${projectKey}/findings`]: () => json(noFindings),
    [`GET /api/projects/${projectKey}/members`]: () => json({ items: [] }),
    [`GET ${base}`]: () => {
      const respond = captureResponses[Math.min(call, captureResponses.length - 1)] as () => Response;
      call++;
      return respond();
    },
    [`GET ${base}/plot`]: () => json(capturePlot()),
  };
}

describe('capture page', () => {
  it('says the retention policy removed the audio instead of offering to play it, and keeps the verdict and checks', async () => {
    seedSession('access-1');
    const api = mockApi(commonHandlers([() => json(detail({ purgedAt: '2027-03-01T07:00:12.000Z' }))]));
    renderApp(pagePath);

    const listen = await screen.findByRole('region', { name: 'Listen' });
    expect(within(listen).getByRole('note').textContent).toBe('The audio of this capture was removed by the retention policy on 2027-03-01; its verdict is kept.');
    expect(screen.queryByRole('button', { name: 'Play capture' })).toBeNull();
    expect(screen.getByRole('table', { name: 'Checks' })).toBeTruthy();
    expect(screen.getAllByText('Fail').length).toBeGreaterThan(0);
    // No plot is asked for: its audio is gone (the API would answer 410).
    expect(screen.queryByRole('region', { name: 'Transfer magnitude' })).toBeNull();
    expect(api.fetchMock.mock.calls.some(([input]) => String(input).includes('/plot'))).toBe(false);
  });

  it('shows why the capture failed: header, spectrum with the worst point, checks failing first, triage', async () => {
    seedSession('access-1');
    const api = mockApi(commonHandlers([() => json(detail())]));
    renderApp(pagePath);

    expect(await screen.findByRole('heading', { level: 1, name: 'Music EQ sweep' })).toBeTruthy();
    expect(screen.getByText('eq.music.sweep')).toBeTruthy();
    expect(screen.getAllByText('Fail').length).toBeGreaterThan(0);
    const judged = screen.getByText(/Judged by engine/);
    expect(judged.textContent).toContain('Judged by engine 0.2.0 against mask rev 1');
    const buildLink = screen.getByRole('link', { name: sha.slice(0, 10) });
    expect(buildLink.getAttribute('href')).toBe(`/projects/${projectKey}/builds/${sha}`);

    const spectrum = screen.getByRole('region', { name: 'Transfer magnitude' });
    const worst = await within(spectrum).findByTestId('worst-point-label');
    expect(worst.textContent).toBe(`${MINUS}1.30 dB margin at 8.02 kHz`);
    expect(within(spectrum).getByRole('figure', { name: 'Spectrum plot' })).toBeTruthy();
    expect(within(spectrum).getByRole('checkbox', { name: /Compare with last pass 3fa9c21/ })).toHaveProperty('checked', true);

    // The plot was asked for at about the plot's width, with the last pass to compare.
    const plotRequest = api.fetchMock.mock.calls.map(([input]) => String(input)).find((url) => url.includes('/plot?'));
    expect(plotRequest).toContain('columns=1024');
    expect(plotRequest).toContain('channel=0');
    expect(plotRequest).toContain('overlay=last-passing');

    const table = screen.getByRole('table', { name: 'Checks' });
    const ids = within(table)
      .getAllByRole('row')
      .slice(1)
      .map((row) => row.getAttribute('data-check-id'));
    expect(ids).toEqual(['eq-response', 'hf-band-level', 'output-level', 'latency']);
    const firstRow = within(table).getAllByRole('row')[1] as HTMLElement;
    expect(within(firstRow).getByText('Fail')).toBeTruthy();
    expect(within(firstRow).getByText(`${MINUS}1.30 dB`)).toBeTruthy();

    expect(screen.getByRole('region', { name: 'Phase and group delay' })).toBeTruthy();
    expect(await screen.findByRole('figure', { name: 'Group delay' })).toBeTruthy();
    expect(await screen.findByRole('figure', { name: 'Waveform' })).toBeTruthy();
    // The findings feature's triage panel, composed at the route.
    expect(await screen.findByText(/No findings for this capture/)).toBeTruthy();
    expect(api.requests.every((r) => r.authorization === 'Bearer access-1')).toBe(true);
  });

  it('says what a re-evaluation by a newer engine changed, and shows a check’s warnings beside it', async () => {
    seedSession();
    const d = detail({ outcome: 'pass', reason: null });
    const verdict = d.capture.verdict!;
    verdict.engineVersion = '1.0.0';
    verdict.previousOutcome = 'fail';
    verdict.previousEngineVersion = '0.4.0';
    verdict.previousMaskRevision = 1;
    verdict.changes = [{ checkId: 'thdn', unit: 'dB', before: { pass: false, measured: -27.06 }, after: { pass: true, measured: -146.12 } }];
    verdict.checks = [
      { id: 'thdn', kind: 'distortion', label: null, pass: true, measured: -146.12, limit: -100, margin: 46.12, unit: 'dB', worstHz: null, warnings: ['distortion and noise were measured on the steady part 0.050…1.950 s; a lead-in of 0.050 s and a tail of 0.050 s were left out'] },
      { id: 'latency', kind: 'timing', label: null, pass: true, measured: 3.521, limit: 10, margin: 6.479, unit: 'ms', worstHz: null },
    ];
    mockApi(commonHandlers([() => json(d)]));
    renderApp(pagePath);

    const panel = await screen.findByRole('region', { name: 'What the re-evaluation changed' });
    expect(panel.textContent).toContain('Re-evaluated (engine 0.4.0 → 1.0.0): the verdict was fail and is pass.');
    const row = within(panel).getAllByRole('row')[1] as HTMLElement;
    expect(row.getAttribute('data-change-id')).toBe('thdn');
    expect(within(row).getAllByRole('cell').map((c) => c.textContent)).toEqual(['thdn', 'fail', `${MINUS}27.06 dB`, 'pass', `${MINUS}146.12 dB`]);

    const table = screen.getByRole('table', { name: 'Checks' });
    const warnings = within(table).getByRole('list', { name: 'Warnings for thdn' });
    expect(warnings.textContent).toContain('a lead-in of 0.050 s and a tail of 0.050 s were left out');
    // Only the check whose measures raised a warning carries a list.
    expect(within(table).queryByRole('list', { name: 'Warnings for latency' })).toBeNull();
  });

  it('zooms the spectrum to a failing check’s worst frequency from the checks table', async () => {
    seedSession();
    mockApi(commonHandlers([() => json(detail())]));
    renderApp(pagePath);
    const user = userEvent.setup();

    const figure = await screen.findByRole('figure', { name: 'Spectrum plot' });
    expect(figure.getAttribute('data-x-range')).toBe('all');
    await user.click(screen.getByRole('button', { name: 'Show 8.02 kHz on the spectrum' }));
    // An octave either side of 8.02 kHz, shared with the phase and group-delay plots.
    expect(figure.getAttribute('data-x-range')).toBe('4010-16040');
    expect(screen.getByRole('figure', { name: 'Group delay' }).getAttribute('data-x-range')).toBe('4010-16040');
    // Only the spectral checks (envelope and band levels) have a frequency to go to.
    expect(screen.getAllByRole('button', { name: /Show .* on the spectrum/ }).map((b) => b.getAttribute('aria-label'))).toEqual([
      'Show 8.02 kHz on the spectrum',
      'Show 7.94 kHz on the spectrum',
    ]);

    await user.click(screen.getByRole('button', { name: 'Reset zoom' }));
    expect(figure.getAttribute('data-x-range')).toBe('all');
  });

  it('sorts the checks by margin from the column header', async () => {
    seedSession();
    mockApi(commonHandlers([() => json(detail())]));
    renderApp(pagePath);
    const user = userEvent.setup();

    const table = await screen.findByRole('table', { name: 'Checks' });
    await user.click(within(table).getByRole('button', { name: /Margin/ }));
    const order = () =>
      within(table)
        .getAllByRole('row')
        .slice(1)
        .map((row) => row.getAttribute('data-check-id'));
    expect(order()).toEqual(['eq-response', 'hf-band-level', 'output-level', 'latency']);
    await user.click(within(table).getByRole('button', { name: /Margin/ }));
    expect(order()).toEqual(['latency', 'output-level', 'hf-band-level', 'eq-response']);
    expect(within(table).getByRole('columnheader', { name: /Margin/ }).getAttribute('aria-sort')).toBe('descending');
  });

  it('shows progress while the capture is analysed and the results once it is done', async () => {
    seedSession();
    const api = mockApi(commonHandlers([() => json(detail({ status: 'analysing' })), () => json(detail())]));
    renderApp(pagePath);

    expect(await screen.findByRole('progressbar', { name: 'Analysis progress' })).toBeTruthy();
    expect(screen.getAllByText('Analysing…').length).toBeGreaterThan(0);
    expect(screen.queryByRole('region', { name: 'Transfer magnitude' })).toBeNull();
    // No plot is asked for before there is a verdict.
    expect(api.requests.some((r) => r.path.endsWith('/plot'))).toBe(false);

    expect(await screen.findByRole('region', { name: 'Transfer magnitude' }, { timeout: 5000 })).toBeTruthy();
    expect(screen.queryByRole('progressbar', { name: 'Analysis progress' })).toBeNull();
  });

  it('shows the stimulus, analysis settings and channel map the verdict was judged with', async () => {
    seedSession();
    const d = detail();
    d.capture.verdict!.settings = {
      stimulus: { kind: 'sweep', sampleRate: 48000, channels: 1, seconds: 5, levelDbfs: -20, from: 20, to: 20000, silenceSeconds: 0, fadeInSeconds: 0, fadeOutSeconds: 0 },
      analysis: { transferMethod: 'h1', transferBandHz: [100, 10000] },
      channelMap: [1],
    };
    mockApi(commonHandlers([() => json(d)]));
    renderApp(pagePath);

    const used = await screen.findByLabelText('Settings this verdict used');
    const pairs = [...used.querySelectorAll('dt')].map((dt) => [dt.textContent, dt.nextElementSibling?.textContent]);
    expect(pairs).toEqual([
      ['Stimulus', 'sweep 20 Hz–20 kHz · 48 kHz'],
      ['Analysis', 'H1, band 100 Hz–10 kHz'],
      ['Channels', '1'],
    ]);
  });

  it('says so when a verdict predates recorded settings', async () => {
    seedSession();
    mockApi(commonHandlers([() => json(detail())]));
    renderApp(pagePath);
    expect(await screen.findByText('This verdict was recorded before verdicts kept the settings they used.')).toBeTruthy();
    expect(screen.queryByLabelText('Settings this verdict used')).toBeNull();
  });

  it('explains an error verdict with its reason', async () => {
    seedSession();
    mockApi(commonHandlers([() => json(detail({ outcome: 'error', reason: 'crossover-phase needs the stimulus and none was given' }))]));
    renderApp(pagePath);

    const note = await screen.findByRole('note', { name: 'Why the analysis could not decide' });
    expect(note.textContent).toContain('crossover-phase needs the stimulus and none was given');
    expect(screen.getAllByText('Error').length).toBeGreaterThan(0);
  });

  it('shows the API’s problem when the capture cannot be loaded', async () => {
    seedSession();
    mockApi({
      'GET /api/me': () => json(engineer),
      [`GET ${base}`]: () => problem(404, 'Capture not found', `No capture ${captureId} in ${projectKey}.`),
    });
    renderApp(pagePath);

    expect(await screen.findByText(`No capture ${captureId} in ${projectKey}.`)).toBeTruthy();
    expect(screen.getByRole('navigation', { name: 'Main' })).toBeTruthy();
  });

  it('shows a plot error with its detail inside the spectrum panel', async () => {
    seedSession();
    mockApi({
      ...commonHandlers([() => json(detail())]),
      [`GET ${base}/plot`]: () => problem(409, 'Plot not ready', 'The analysis result for this capture is being rebuilt.'),
    });
    renderApp(pagePath);

    const spectrum = await screen.findByRole('region', { name: 'Transfer magnitude' });
    const alert = await within(spectrum).findByRole('alert');
    expect(alert.textContent).toContain('The analysis result for this capture is being rebuilt.');
    expect(alert.textContent).toContain('HTTP 409');
    expect(within(alert).getByRole('button', { name: 'Try again' })).toBeTruthy();
  });
});

type FakeGain = { gain: { value: number; setTargetAtTime: (v: number) => void } };

function installFakeAudio() {
  const gains: FakeGain[] = [];
  const started: string[] = [];
  const stopped: number[] = [];
  const connect = <T,>(node: T) => node;
  class FakeAudioContext {
    currentTime = 0;
    destination = {};
    async decodeAudioData() {
      // One channel whose float samples reach +2 (≈ +6 dBFS): playback must scale it down.
      return { numberOfChannels: 1, duration: 1, getChannelData: () => new Float32Array([0.5, -2, 1]) };
    }
    createGain() {
      const node: FakeGain & { connect: typeof connect; disconnect: () => void } = {
        gain: {
          value: 1,
          setTargetAtTime(v: number) {
            node.gain.value = v;
          },
        },
        connect,
        disconnect: () => undefined,
      };
      gains.push(node);
      return node;
    }
    createDynamicsCompressor() {
      return { threshold: { value: 0 }, knee: { value: 0 }, ratio: { value: 0 }, attack: { value: 0 }, release: { value: 0 }, connect };
    }
    createBufferSource() {
      return {
        buffer: null as unknown,
        onended: null as null | (() => void),
        connect,
        disconnect: () => undefined,
        start: () => started.push('start'),
        stop: () => stopped.push(1),
      };
    }
    resume = async () => undefined;
    close = async () => undefined;
  }
  vi.stubGlobal('AudioContext', FakeAudioContext);
  return { gains, started, stopped };
}

describe('listen panel', () => {
  it('asks for the caution first, starts low, caps the level and fetches audio with the session', async () => {
    seedSession('access-9');
    window.sessionStorage.clear();
    const audio = installFakeAudio();
    const api = mockApi({
      ...commonHandlers([() => json(detail())]),
      [`GET ${base}/audio/capture`]: () => new Response(new Uint8Array([82, 73, 70, 70]), { headers: { 'Content-Type': 'audio/wav' } }),
      [`GET ${base}/audio/residual`]: () => problem(404, 'No residual', 'This capture has no tone to remove.'),
    });
    renderApp(pagePath);
    const user = userEvent.setup();

    const listen = await screen.findByRole('region', { name: 'Listen' });
    expect(within(listen).getByRole('note', { name: 'Listening caution' }).textContent).toContain(
      'Test signals and residuals can be loud. Playing them through loudspeakers or headphones can damage hearing and drivers. Start at a low level.',
    );
    const playCapture = within(listen).getByRole('button', { name: 'Play capture' });
    expect(playCapture).toHaveProperty('disabled', true);
    expect(within(listen).getByRole('button', { name: 'Play stimulus' })).toHaveProperty('disabled', true);

    const slider = within(listen).getByRole('slider', { name: 'Playback level' });
    expect(slider.getAttribute('max')).toBe('-6');
    expect((slider as HTMLInputElement).value).toBe('-30');

    await user.click(within(listen).getByRole('checkbox', { name: /I understand/ }));
    expect(window.sessionStorage.getItem('earmark.listen.caution-acknowledged')).toBe('1');
    await user.click(playCapture);

    await waitFor(() => expect(audio.started).toEqual(['start']));
    const audioRequest = api.requests.find((r) => r.path.endsWith('/audio/capture'));
    expect(audioRequest?.authorization).toBe('Bearer access-9');
    // −30 dB, divided by the buffer's peak of 2 so the output peak stays at −30 dB re full scale.
    const gain = audio.gains[0] as FakeGain;
    expect(gain.gain.value).toBeCloseTo(10 ** (-30 / 20) / 2, 9);

    // Even a slider forced past its end cannot go above the cap.
    const { fireEvent } = await import('@testing-library/react');
    fireEvent.change(slider, { target: { value: '6' } });
    expect(gain.gain.value * 2).toBeLessThanOrEqual(10 ** (-6 / 20) + 1e-12);

    await user.click(within(listen).getByRole('button', { name: 'Stop' }));
    expect(audio.stopped.length).toBeGreaterThan(0);

    await user.click(within(listen).getByRole('button', { name: 'Play residual' }));
    expect((await within(listen).findByRole('alert')).textContent).toContain('This capture has no tone to remove.');
  });

  it('remembers the acknowledgement for the rest of the browser session', async () => {
    seedSession();
    window.sessionStorage.setItem('earmark.listen.caution-acknowledged', '1');
    installFakeAudio();
    mockApi(commonHandlers([() => json(detail())]));
    renderApp(pagePath);

    const listen = await screen.findByRole('region', { name: 'Listen' });
    expect(within(listen).getByRole('checkbox', { name: /I understand/ })).toHaveProperty('checked', true);
    expect(within(listen).getByRole('button', { name: 'Play capture' })).toHaveProperty('disabled', false);
    window.sessionStorage.clear();
  });
});

describe('capture page: which check is drawn, downloads and analysing again', () => {
  /** The mask holds two envelopes: the first passes, the second fails on channel 1 only. */
  function twoEnvelopes(): CaptureDetail {
    const d = detail();
    d.mask!.checks.push({ kind: 'magnitude-envelope', id: 'hf-guard', measure: 'transfer', referenceHz: 500, upper: [{ hz: 4000, db: 0.5 }, { hz: 16000, db: 0.5 }] });
    d.capture.verdict!.checks = [
      { id: 'eq-response', kind: 'magnitude-envelope', label: null, pass: true, measured: 0.7, limit: 1, margin: 0.3, unit: 'dB', worstHz: 4000, channel: 0 },
      { id: 'hf-guard', kind: 'magnitude-envelope', label: null, pass: false, measured: 1.33, limit: 0.5, margin: -0.83, unit: 'dB', worstHz: 7990, channel: 1, warnings: ['The stimulus has little energy above 15 kHz; the response there is less certain.'] },
    ];
    return d;
  }

  it('opens on the failing check and its channel, not the first envelope on channel 0, and follows a choice', async () => {
    seedSession();
    const api = mockApi({
      ...commonHandlers([() => json(twoEnvelopes())]),
      // The plot of the check and channel asked for.
      [`GET ${base}/plot`]: (request) => {
        const query = new URLSearchParams(request.search);
        return json({ ...capturePlot(), checkId: query.get('check'), channel: Number(query.get('channel')) });
      },
    });
    const user = userEvent.setup();
    renderApp(pagePath);

    const spectrum = await screen.findByRole('region', { name: 'Transfer magnitude' }, { timeout: 5000 });
    const picker = within(spectrum).getByRole('combobox', { name: 'Check' }) as HTMLSelectElement;
    expect(picker.value).toBe('hf-guard');
    expect([...picker.options].map((o) => o.textContent)).toEqual([
      'eq-response · Magnitude envelope · pass, +0.30 dB, worst on ch 0',
      `hf-guard · Magnitude envelope · fail, ${MINUS}0.83 dB, worst on ch 1`,
    ]);
    expect(within(spectrum).getByRole('radio', { name: 'Ch 1' }).getAttribute('aria-checked')).toBe('true');
    const firstPlot = await waitFor(() => {
      const request = api.requests.find((r) => r.path.endsWith('/plot'));
      expect(request).toBeTruthy();
      return request!;
    });
    expect(new URLSearchParams(firstPlot.search).get('check')).toBe('hf-guard');
    expect(new URLSearchParams(firstPlot.search).get('channel')).toBe('1');
    // The warning the engine raised for this check stands beside its plot.
    expect((await within(spectrum).findByRole('list', { name: 'Warnings for hf-guard' })).textContent).toContain('little energy above 15 kHz');

    await user.selectOptions(picker, 'eq-response');
    await waitFor(() => {
      const last = api.requests.filter((r) => r.path.endsWith('/plot')).at(-1)!;
      expect(new URLSearchParams(last.search).get('check')).toBe('eq-response');
      expect(new URLSearchParams(last.search).get('channel')).toBe('0');
    });
  });

  it('lets an engineer analyse the capture again: it posts, says so and follows the new analysis', async () => {
    seedSession();
    let posted = 0;
    const api = mockApi({
      ...commonHandlers([() => json(detail({ outcome: 'error', reason: 'The stored capture cannot be read: storage outage' })), () => json(detail({ status: 'queued' })), () => json(detail())]),
      [`POST ${base}/reanalyse`]: () => {
        posted++;
        return json({ captureId, status: 'queued', reanalysisId: '0b0e0c0a-1111-4222-8333-944445555666' }, 202);
      },
    });
    const user = userEvent.setup();
    renderApp(pagePath);

    await user.click(await screen.findByRole('button', { name: 'Analyse again' }));
    expect(posted).toBe(1);
    expect(await screen.findByText('Analysis queued')).toBeTruthy();
    expect(await screen.findByRole('progressbar', { name: 'Analysis progress' })).toBeTruthy();
    expect(await screen.findByRole('region', { name: 'Transfer magnitude' }, { timeout: 5000 })).toBeTruthy();
    expect(api.requests.filter((r) => r.method === 'POST').map((r) => r.path)).toEqual([`${base}/reanalyse`]);
  });

  it('says in words why the download failed once retention removed the audio, and offers viewers no re-analysis', async () => {
    seedSession();
    const viewer: CurrentUser = { ...engineer, memberships: [{ projectKey, projectName: 'Kestrel Buds', role: 'viewer' }] };
    mockApi({
      ...commonHandlers([() => json(detail())]),
      'GET /api/me': () => json(viewer),
      [`GET ${base}/download`]: () => problem(410, 'Gone', 'The audio of this capture was removed by the retention policy on 2027-03-01; its verdict is kept.'),
    });
    const user = userEvent.setup();
    renderApp(pagePath);

    await user.click(await screen.findByRole('button', { name: 'Download capture (WAV)' }));
    expect(await screen.findByText('The audio of this capture was removed by the retention policy on 2027-03-01; its verdict is kept.')).toBeTruthy();
    expect(screen.queryByRole('button', { name: 'Analyse again' })).toBeNull();
  });
});
