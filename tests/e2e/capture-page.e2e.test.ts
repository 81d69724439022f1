import fs from 'node:fs';
import { StimulusSpec } from '@earmark/contracts';
import { TEST_PASSWORD } from '@earmark/db';
import { encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import type { Locator, Page, Response } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { screenshot, screenshotsDir } from '../support/browser-session.js';
import { startStack, type Stack } from '../support/stack.js';
import { waitFor } from '../support/wait-for.js';

/**
 * The capture page in a real browser, on data made through the API as a team would: a sweep
 * test case judged on two channels by a mask with two envelopes, whose second (a high-frequency
 * guard) fails only on channel 1 where the firmware tilts the response up. The page must open
 * on that check and channel, say what it plots, tick its axes right, tell its legend entries
 * apart, hand out the curves and the capture, analyse again, and fit a phone.
 */
const FS = 48000;
const CASE = 'sweep.pair';
const TARGET = 'pair-board';
const PASS_SHA = 'a11ce0000001';
const FAIL_SHA = 'b0b000000002';
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 0.5, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.1, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const stimulus = stimulusAsPlayed(spec).channels[0]!;
/** y[n] = x[n] − 0.2·x[n−1]: a gentle tilt, +1.15 dB at 8 kHz and +2.85 dB at 16 kHz re 1 kHz. */
const tilted = stimulus.map((x, n) => x - 0.2 * (n > 0 ? (stimulus[n - 1] as number) : 0));
const wavOf = (channels: Float64Array[]) => Buffer.from(encodeWav(channels, FS, { bitsPerSample: 24 }));
const passing = wavOf([stimulus, stimulus]);
const failing = wavOf([stimulus, tilted]);

const CHECKS = [
  { id: 'env-wide', kind: 'magnitude-envelope', measure: 'transfer', label: 'Broad response', upper: [{ hz: 20, db: 6 }, { hz: 20000, db: 6 }], lower: [{ hz: 20, db: -6 }, { hz: 20000, db: -6 }] },
  { id: 'env-hf', kind: 'magnitude-envelope', measure: 'transfer', label: 'High-frequency guard', upper: [{ hz: 4000, db: 0.5 }, { hz: 16000, db: 0.5 }], lower: [{ hz: 4000, db: -0.5 }, { hz: 16000, db: -0.5 }] },
  { id: 'bands-mid', kind: 'band-levels', measure: 'transfer', fraction: 3, bands: [{ centerHz: 500, min: -1, max: 1 }, { centerHz: 630, min: -1, max: 1 }, { centerHz: 800, min: -1, max: 1 }, { centerHz: 1000, min: -1, max: 1 }, { centerHz: 1250, min: -1, max: 1 }] },
];

let stack: Stack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
const consoleErrors: string[] = [];
let failingCaptureId = '';
let errorCaptureId = '';

async function api<T = any>(method: string, path: string, token: string, body?: unknown): Promise<T> {
  const res = await fetch(`${stack.url}${path}`, {
    method,
    headers: { authorization: `Bearer ${token}`, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${text}`);
  return (text ? JSON.parse(text) : null) as T;
}

async function login(email: string): Promise<string> {
  const res = await fetch(`${stack.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: TEST_PASSWORD }) });
  return ((await res.json()) as { accessToken: string }).accessToken;
}

/** Uploads a capture with the CI token and waits for its verdict (the upload itself is awaited first, so builds keep their order). */
async function submit(sha: string, testCase: string, bytes: Buffer): Promise<() => Promise<{ id: string; outcome: string }>> {
  const res = await fetch(`${stack.url}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=${testCase}&target=${TARGET}`, {
    method: 'POST',
    headers: { authorization: `Bearer ${stack.ciToken}`, 'content-type': 'audio/wav' },
    body: new Uint8Array(bytes),
  });
  const created = (await res.json()) as { id: string };
  expect(res.status, JSON.stringify(created)).toBe(202);
  return () => waitFor(async () => {
    const c = await api<{ id: string; verdict: { outcome: string } | null; status: string }>('GET', `/api/v1/captures/${created.id}`, stack.ciToken);
    return c.verdict && c.status !== 'queued' && c.status !== 'analysing' ? { id: c.id, outcome: c.verdict.outcome } : null;
  }, { timeoutMs: 60_000, what: `the verdict of ${sha}` });
}

async function approvedMask(testCase: string, checks: unknown[], engineer: string, qa: string): Promise<void> {
  const draft = await api<{ revision: number }>('POST', `/api/projects/alpha-dsp/test-cases/${testCase}/masks`, engineer, { checks, note: 'e2e mask' });
  await api('POST', `/api/projects/alpha-dsp/test-cases/${testCase}/masks/${draft.revision}/submit`, engineer);
  await api('POST', `/api/projects/alpha-dsp/test-cases/${testCase}/masks/${draft.revision}/approve`, qa, {});
}

beforeAll(async () => {
  fs.mkdirSync(screenshotsDir, { recursive: true });
  [stack, browser] = await Promise.all([startStack({ seed: 'roles' }), launchBrowser()]);
  const worker = stack.startWorker();
  const engineer = await login('engineer@example.test');
  const qa = await login('qa_manager@example.test');
  await api('POST', '/api/projects/alpha-dsp/targets', engineer, { key: TARGET, name: 'Pair board', sampleRate: null });
  await api('POST', '/api/projects/alpha-dsp/test-cases', engineer, { key: CASE, name: 'Sweep, both channels', stimulus: spec, channelMap: [0, 1] });
  // A test case whose band reaches past half the sample rate: judged `error`, with its reason.
  const lowRate = StimulusSpec.parse({ kind: 'sweep', sampleRate: 32000, seconds: 0.25, from: 20, to: 15000, levelDbfs: -12, silenceSeconds: 0.05 });
  await api('POST', '/api/projects/alpha-dsp/test-cases', engineer, { key: 'sweep.32k', name: 'Sweep at 32 kHz', stimulus: lowRate, channelMap: [0] });
  await Promise.all([
    approvedMask(CASE, CHECKS, engineer, qa),
    approvedMask('sweep.32k', [{ id: 'top-band', kind: 'band-levels', measure: 'transfer', fraction: 3, bands: [{ centerHz: 16000, max: 3 }] }], engineer, qa),
  ]);

  // Uploaded in order (the passing build first, so it is the last pass), judged while the worker starts.
  const verdicts = [
    await submit(PASS_SHA, CASE, passing),
    await submit(FAIL_SHA, CASE, failing),
    await submit(FAIL_SHA, 'sweep.32k', Buffer.from(encodeWav(stimulusAsPlayed(lowRate).channels, 32000, { bitsPerSample: 24 }))),
  ];
  await worker;
  const [passed, failed, errored] = await Promise.all(verdicts.map((wait) => wait()));
  expect([passed!.outcome, failed!.outcome, errored!.outcome]).toEqual(['pass', 'fail', 'error']);
  failingCaptureId = failed!.id;
  errorCaptureId = errored!.id;
}, 240_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

async function pageAs(email: string): Promise<Page> {
  const page = await browser.context.newPage();
  page.on('console', (msg) => {
    if (msg.type() === 'error') consoleErrors.push(`${email}: ${msg.text()}`);
  });
  page.on('pageerror', (error) => consoleErrors.push(`${email}: ${error.message}`));
  await page.goto(`${stack.url}/`);
  await page.evaluate(() => localStorage.clear());
  await page.goto(`${stack.url}/sign-in`);
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(TEST_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('heading', { name: 'Projects' }).waitFor();
  return page;
}

/** One signed-in engineer tab for the tests that act as an engineer (signing in costs seconds). */
let engineerTab: Page | null = null;
async function engineerPage(): Promise<Page> {
  engineerTab ??= await pageAs('engineer@example.test');
  await engineerTab.setViewportSize({ width: 1440, height: 900 });
  return engineerTab;
}

const capturePath = (id: string, sha = FAIL_SHA) => `/projects/alpha-dsp/builds/${sha}/captures/${id}`;

async function noDocumentOverflow(page: Page, width: number): Promise<void> {
  await page.setViewportSize({ width, height: 900 });
  await page.waitForTimeout(250);
  const widths = await page.evaluate(() => {
    const scroll = () => document.documentElement.scrollWidth;
    const culprits: string[] = [];
    if (scroll() > window.innerWidth) {
      // Name the culprit: the chain of elements whose hiding brings the page back within the viewport.
      const walk = (root: Element, depth: number) => {
        for (const child of Array.from(root.children) as HTMLElement[]) {
          const display = child.style.display;
          const before = scroll();
          child.style.display = 'none';
          const without = scroll();
          child.style.display = display;
          if (without < before) {
            culprits.push(`${child.tagName.toLowerCase()}.${String(child.className).slice(0, 40)} (${before} → ${without} px)`);
            if (depth < 12) walk(child, depth + 1);
          }
        }
      };
      walk(document.body, 0);
    }
    return { scroll: scroll(), inner: window.innerWidth, culprits };
  });
  expect(widths.scroll, `document ${widths.scroll} px wide at ${width} px: ${widths.culprits.join(' > ')}`).toBeLessThanOrEqual(widths.inner);
}

/** The titles and tick labels a plot draws on its canvas, as it reports them in text. */
async function axes(figure: Locator): Promise<Record<'x' | 'y', { title: string; ticks: string[] }>> {
  const lines = figure.getByTestId('plot-axes').locator('p');
  await lines.first().waitFor({ state: 'attached' });
  const all = await lines.evaluateAll((nodes) => nodes.map((n) => ({ axis: (n as HTMLElement).dataset.axis, title: (n as HTMLElement).dataset.title, ticks: (n as HTMLElement).dataset.ticks })));
  const of = (axis: 'x' | 'y') => {
    const line = all.find((l) => l.axis === axis);
    return { title: line?.title ?? '', ticks: line?.ticks ? line.ticks.split('|') : [] };
  };
  return { x: of('x'), y: of('y') };
}

const number = (label: string) => Number(label.replace('\u2212', '-'));

/** Evenly spaced ticks whose labels show every value exactly with one number of decimals. */
function expectExactEvenTicks(ticks: string[], what: string): void {
  expect(ticks.length, `${what}: ${ticks.join(', ')}`).toBeGreaterThanOrEqual(3);
  const values = ticks.map(number);
  const step = (values[1] as number) - (values[0] as number);
  values.forEach((v, i) => expect(Math.abs(v - (values[0] as number) - i * step), `${what}: ${ticks.join(', ')}`).toBeLessThan(1e-9));
  const decimals = new Set(ticks.map((t) => (t.split('.')[1] ?? '').length));
  expect(decimals.size, `${what}: ${ticks.join(', ')}`).toBe(1);
}

describe('the capture page in the browser', () => {
  it('opens on the worst check and channel, titles and ticks its plots, and tells its legend entries apart (1440 px)', async () => {
    const page = await engineerPage();
    await page.goto(`${stack.url}${capturePath(failingCaptureId)}`);
    const spectrum = page.getByRole('region', { name: 'Transfer magnitude' });
    await spectrum.locator('canvas').first().waitFor();

    // The verdict fails on env-hf, channel 1: the page opens there, not on env-wide / ch 0.
    expect(await spectrum.getByRole('combobox', { name: 'Check' }).inputValue()).toBe('env-hf');
    expect(await spectrum.getByRole('radio', { name: 'Ch 1' }).getAttribute('aria-checked')).toBe('true');
    const worst = spectrum.getByTestId('worst-point-label');
    await worst.waitFor();
    expect(await worst.textContent()).toMatch(/^−[12]\.\d\d dB margin at 1[56](\.\d)? kHz$/);

    const magnitude = await axes(spectrum.getByRole('figure', { name: 'Spectrum plot' }));
    expect(magnitude.y.title).toBe('|H| re 1 kHz, dB');
    expectExactEvenTicks(magnitude.y.ticks, 'magnitude');
    expect(magnitude.x.title).toBe('Frequency, Hz');
    expect(magnitude.x.ticks).toEqual(expect.arrayContaining(['5k', '10k']));

    const response = page.getByRole('region', { name: 'Phase and group delay' });
    const phase = await axes(response.getByRole('figure', { name: 'Unwrapped phase' }));
    expect(phase.y.title).toBe('Phase, degrees');
    expectExactEvenTicks(phase.y.ticks, 'phase');
    // The same frequency range as the magnitude plot, so the same frequency ticks.
    expect(phase.x.ticks).toEqual(magnitude.x.ticks);
    const delay = await axes(response.getByRole('figure', { name: 'Group delay' }));
    expect(delay.y.title).toBe('Group delay, ms');

    const waveform = await axes(page.getByRole('region', { name: 'Waveform' }).getByRole('figure', { name: 'Waveform' }));
    expect(waveform.x.title).toBe('Time, s');
    expectExactEvenTicks(waveform.x.ticks, 'time');
    expect(waveform.y.title).toBe('Sample value, FS');

    const legend = spectrum.getByRole('list', { name: 'Legend' }).locator('li');
    const entries = await legend.evaluateAll((items) => items.map((li) => ({ text: li.textContent?.trim() ?? '', swatch: li.querySelector('[data-swatch]')?.getAttribute('data-swatch') ?? '', look: li.querySelector('svg')?.innerHTML ?? '' })));
    const texts = entries.map((e) => e.text);
    expect(texts).toEqual(expect.arrayContaining(['Measured, ch 1 (min/max per column)', 'Upper limit', 'Lower limit', `Last pass ${PASS_SHA.slice(0, 7)} (dashed)`]));
    expect(new Set(texts).size).toBe(texts.length);
    expect(new Set(entries.map((e) => e.look)).size).toBe(entries.length);
    expect(entries.find((e) => e.text === 'Upper limit')?.look).not.toBe(entries.find((e) => e.text === 'Lower limit')?.look);

    // Band levels draw as steps with their own legend.
    await spectrum.getByRole('combobox', { name: 'Check' }).selectOption('bands-mid');
    await spectrum.getByRole('list', { name: 'Legend' }).getByText('Band level (1/3 octave)').waitFor();
    expect(await spectrum.getByRole('radio', { name: 'Ch 1' }).getAttribute('aria-checked')).toBe('true');
    await spectrum.getByRole('combobox', { name: 'Check' }).selectOption('env-hf');
    await worst.waitFor();

    await noDocumentOverflow(page, 1280);
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.waitForTimeout(300);
    await screenshot(page, 'capture');
  });

  it('downloads the plotted curves as CSV and the capture exactly as uploaded', async () => {
    const page = await engineerPage();
    const plots: Array<{ checkId: string; channel: number; spectrum: { hz: number[] } }> = [];
    const onResponse = async (res: Response) => {
      if (res.url().includes('/plot?') && res.ok()) plots.push(await res.json());
    };
    page.on('response', onResponse);
    await page.goto(`${stack.url}${capturePath(failingCaptureId)}`);
    const spectrum = page.getByRole('region', { name: 'Transfer magnitude' });
    await spectrum.getByTestId('worst-point-label').waitFor();

    const [csvFile] = await Promise.all([page.waitForEvent('download'), spectrum.getByRole('button', { name: 'Download curves (CSV)' }).click()]);
    expect(csvFile.suggestedFilename()).toBe(`${CASE}_${TARGET}_${FAIL_SHA.slice(0, 7)}_env-hf_ch1.csv`);
    const lines = fs.readFileSync((await csvFile.path())!, 'utf8').trimEnd().split('\n');
    expect(lines[0]).toBe('"frequency (Hz)","measured min (dB)","measured max (dB)","upper limit (dB)","lower limit (dB)","last pass min (dB)","last pass max (dB)"');
    const drawn = plots.filter((p) => p.checkId === 'env-hf' && p.channel === 1).at(-1)!;
    expect(lines.length - 1).toBe(drawn.spectrum.hz.filter((hz) => hz > 0).length);
    const rows = lines.slice(1).map((l) => l.split(','));
    const near10k = rows.reduce((best, r) => (Math.abs(Math.log(Number(r[0]) / 10000)) < Math.abs(Math.log(Number(best[0]) / 10000)) ? r : best));
    expect([near10k[3], near10k[4]]).toEqual(['0.5', '-0.5']);
    // The tilt: about +1.4 dB at 10 kHz on channel 1, the last pass flat.
    expect(Number(near10k[2])).toBeGreaterThan(1);
    expect(Math.abs(Number(near10k[6]))).toBeLessThan(0.2);
    expect(rows.every((r) => r.length === 7)).toBe(true);

    const [wavFile] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Download capture (WAV)' }).click()]);
    expect(wavFile.suggestedFilename()).toBe(`${CASE}_${TARGET}_${FAIL_SHA.slice(0, 7)}.wav`);
    expect(fs.readFileSync((await wavFile.path())!).equals(failing)).toBe(true);
    await page.getByText('Capture downloaded').waitFor();
    page.off('response', onResponse);
  });

  it('shows the error reason in the build matrix and analyses a capture again, following the new verdict', async () => {
    const page = await engineerPage();
    await page.goto(`${stack.url}/projects/alpha-dsp/builds/${FAIL_SHA}`);
    const matrix = page.getByRole('table', { name: 'Build matrix' });
    const errorCell = matrix.locator(`[data-testcase="sweep.32k"][data-target="${TARGET}"]`);
    await errorCell.waitFor();
    expect(await errorCell.getAttribute('data-outcome')).toBe('error');
    expect(await errorCell.getByTestId('error-reason').textContent()).toMatch(/band reaches above half the sample rate \(16000 Hz\)/);
    await noDocumentOverflow(page, 390);
    await noDocumentOverflow(page, 1280);
    await page.setViewportSize({ width: 1440, height: 900 });
    await screenshot(page, 'build');

    await page.goto(`${stack.url}${capturePath(errorCaptureId)}`);
    const before = await api<{ capture: { verdict: { createdAt: string } } }>('GET', `/api/projects/alpha-dsp/captures/${errorCaptureId}`, await login('viewer@example.test'));
    await page.getByRole('button', { name: 'Analyse again' }).click();
    await page.getByText('Analysis queued').waitFor();
    // The page polls and shows the new verdict, which names the one it replaced.
    await page.getByText(/re-evaluated; it was error before/).waitFor({ timeout: 60_000 });
    const after = await api<{ capture: { verdict: { createdAt: string; outcome: string } } }>('GET', `/api/projects/alpha-dsp/captures/${errorCaptureId}`, await login('viewer@example.test'));
    expect(after.capture.verdict.createdAt).not.toBe(before.capture.verdict.createdAt);
    expect(after.capture.verdict.outcome).toBe('error');
  });

  it('fits a phone: the page and its plots stay within 390 px', async () => {
    const page = await pageAs('viewer@example.test');
    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(`${stack.url}${capturePath(failingCaptureId)}`);
    const spectrum = page.getByRole('region', { name: 'Transfer magnitude' });
    await spectrum.locator('canvas').first().waitFor();
    await spectrum.getByTestId('worst-point-label').waitFor();
    await noDocumentOverflow(page, 390);
    const canvasWidth = await spectrum.locator('canvas').first().evaluate((c) => c.getBoundingClientRect().width);
    expect(canvasWidth).toBeLessThanOrEqual(390);
    expect(await page.getByRole('button', { name: 'Analyse again' }).count()).toBe(0);
    await page.setViewportSize({ width: 390, height: 844 });
    await page.waitForTimeout(300);
    await page.waitForLoadState('networkidle');
    await page.screenshot({ path: `${screenshotsDir}/capture-phone.png` });
    await page.close();
  });

  it('wrote no console errors in any page', () => {
    expect(consoleErrors).toEqual([]);
  });
});
