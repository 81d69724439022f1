import fs from 'node:fs';
import { DeriveMaskResponse, formatFrequency, formatMargin, formatPercent, MaskRevisionDto, StimulusSpec, type MagnitudeEnvelopeCheck } from '@earmark/contracts';
import { DEMO_PASSWORD } from '@earmark/db';
import { createSeededRandom, encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import { applyBiquad, peakingEqCoefficients, scaleDb } from '@earmark/dsp/testing';
import type { Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { screenshot, screenshotsDir, signedInPage } from '../support/browser-session.js';
import { startStack, type Stack } from '../support/stack.js';

/**
 * The derive wizard as a QA manager uses it: golden captures of nine units with realistic
 * unit-to-unit ripple, one with a resonance (the outlier), and one capture of another target,
 * uploaded through the CI API. The wizard shows few breakpoints at rounded frequencies, flags the
 * outlier by name, warns when targets mix, states the yield estimate and moves it with the guard
 * slider, and replaces or adds the check in the saved draft.
 */
let stack: Stack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
const errors: string[] = [];
const project = 'kestrel-buds';
const caseKey = 'derive.sweep';
const spec = StimulusSpec.parse({ kind: 'sweep', sampleRate: 48000, seconds: 1, levelDbfs: -12, from: 20, to: 20000, silenceSeconds: 0.2 });
const units = Array.from({ length: 9 }, (_, i) => `golden-unit-0${i + 1}`);
const OUTLIER = 'golden-unit-06';
const OTHER_TARGET_LABEL = 'bench-unit-01';
let qaToken = '';
const captureOf = new Map<string, string>();

/** One unit: the stimulus through four gentle peaking sections drawn per unit (σ 0.25 dB), the outlier with a +4 dB resonance at 7 kHz. */
function unitWav(label: string): Uint8Array<ArrayBuffer> {
  const random = createSeededRandom([...label].reduce((h, c) => (h * 31 + c.charCodeAt(0)) >>> 0, 7));
  let y = scaleDb(stimulusAsPlayed(spec).channels[0]!, 0.1 * random.nextGaussian());
  for (const hz of [300, 1200, 4000, 12000]) y = applyBiquad(y, peakingEqCoefficients(48000, hz * 2 ** (0.2 * random.nextGaussian()), 0.25 * random.nextGaussian(), 1.1));
  if (label === OUTLIER) y = applyBiquad(y, peakingEqCoefficients(48000, 7000, 4, 2));
  return new Uint8Array(encodeWav([y], 48000, { bitsPerSample: 24 }));
}

async function api<T>(method: string, path: string, token: string, body?: unknown): Promise<T> {
  const res = await fetch(`${stack.url}${path}`, { method, headers: { authorization: `Bearer ${token}`, ...(body ? { 'content-type': 'application/json' } : {}) }, ...(body ? { body: JSON.stringify(body) } : {}) });
  if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

const login = async (email: string) => (await api<{ accessToken: string }>('POST', '/api/auth/login', '', { email, password: DEMO_PASSWORD })).accessToken;

beforeAll(async () => {
  fs.mkdirSync(screenshotsDir, { recursive: true });
  stack = await startStack({ seed: 'demo' });
  browser = await launchBrowser();
  const admin = await login('admin@fernwick.test');
  qaToken = await login('qa@fernwick.test');
  await api('POST', `/api/projects/${project}/test-cases`, admin, { key: caseKey, name: 'Derive wizard sweep', stimulus: spec });
  // The draft the derivation is for: a flat ±1.5 dB envelope and a level check.
  await api('POST', `/api/projects/${project}/test-cases/${caseKey}/masks`, qaToken, {
    checks: [
      { id: 'response', kind: 'magnitude-envelope', label: 'Within ±1.5 dB', measure: 'transfer', referenceHz: 1000, smoothing: 6, upper: [{ hz: 50, db: 1.5 }, { hz: 16000, db: 1.5 }], lower: [{ hz: 50, db: -1.5 }, { hz: 16000, db: -1.5 }] },
      { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -30, max: -6 },
    ],
    note: 'Limits to be derived from the golden units.',
  });
  const ci = { authorization: `Bearer ${stack.ciToken}` };
  const put = async (sha: string, label: string, target: string) => {
    const build = await fetch(`${stack.url}/api/v1/projects/${project}/builds`, { method: 'POST', headers: { ...ci, 'content-type': 'application/json' }, body: JSON.stringify({ sha, branch: 'main', label }) });
    expect(build.ok).toBe(true);
    const res = await fetch(`${stack.url}/api/v1/projects/${project}/builds/${sha}/captures?testCase=${caseKey}&target=${target}`, { method: 'POST', headers: { ...ci, 'content-type': 'audio/wav' }, body: unitWav(label) });
    expect(res.status, await res.clone().text()).toBe(202);
    captureOf.set(label, ((await res.json()) as { id: string }).id);
  };
  for (const [i, label] of units.entries()) await put(`d${i}e${'0'.repeat(7)}${i}`, label, 'evt2-48k');
  await put('d9f00000009', OTHER_TARGET_LABEL, 'dvt1-48k');
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

const masksUrl = () => `${stack.url}/projects/${project}/test-cases/${caseKey}/masks?rev=1`;
/** True once the document fits the window; plots redraw a frame or two after a resize, so it polls (5 s). */
async function noOverflow(page: Page): Promise<boolean> {
  const fits = () => page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth);
  for (const deadline = Date.now() + 5000; Date.now() < deadline; await page.waitForTimeout(200)) if (await fits()) return true;
  return fits();
}

/** Ticks exactly the named captures in the wizard's list. */
async function choose(wizard: Locator, labels: readonly string[]): Promise<void> {
  const items = wizard.getByRole('listitem').filter({ has: wizard.page().getByRole('checkbox') });
  for (let i = 0; i < (await items.count()); i++) {
    const item = items.nth(i);
    const text = (await item.textContent()) ?? '';
    await item.getByRole('checkbox').setChecked(labels.some((l) => text.includes(l)));
  }
}

async function openWizard(page: Page): Promise<Locator> {
  await page.goto(masksUrl());
  await page.getByRole('heading', { name: `Masks — ${caseKey}` }).waitFor();
  const button = page.getByRole('button', { name: 'Derive from captures' });
  await expect.poll(() => button.isEnabled(), { timeout: 15_000 }).toBe(true);
  await button.click();
  return page.getByRole('dialog', { name: 'Derive limits from golden captures' });
}

/** Presses "Preview limits"; answers the proposal the page received and the request's time, ms. */
async function previewLimits(page: Page, wizard: Locator): Promise<{ proposal: DeriveMaskResponse; ms: number }> {
  const started = Date.now();
  const response = page.waitForResponse((r) => r.url().endsWith('/masks/derive') && r.request().method() === 'POST');
  await wizard.getByRole('button', { name: 'Preview limits' }).click();
  expect((await response).status()).toBe(200);
  const ms = Date.now() - started;
  const proposal = DeriveMaskResponse.parse(await (await response).json());
  await wizard.getByRole('figure', { name: 'New check preview' }).waitFor();
  return { proposal, ms };
}

const yieldText = (wizard: Locator) => wizard.getByRole('region', { name: 'Yield estimate' }).getByRole('status').textContent();

describe('derive wizard in the browser', () => {
  let page: Page;

  it('warns, naming them, when the golden captures come from two targets', async () => {
    page = await signedInPage(browser.context, stack.url, 'qa@fernwick.test', errors);
    await page.setViewportSize({ width: 1440, height: 900 });
    const wizard = await openWizard(page);
    await choose(wizard, ['golden-unit-01', 'golden-unit-02', 'golden-unit-03', OTHER_TARGET_LABEL]);
    await previewLimits(page, wizard);
    const warning = wizard.getByRole('alert');
    expect(await warning.textContent()).toContain('Targets mixed: dvt1-48k, evt2-48k. The golden captures come from 2 targets: dvt1-48k (1), evt2-48k (3).');
    await wizard.getByRole('button', { name: 'Cancel' }).click();
  });

  it('previews the new check: few breakpoints at rounded frequencies, the outlier flagged by name, the yield moving with the guard slider', async () => {
    const wizard = await openWizard(page);
    await choose(wizard, units);
    const { proposal, ms } = await previewLimits(page, wizard);
    console.info(`derive request with ${units.length} captures of 1.2 s: ${ms} ms`);
    expect(await wizard.getByRole('alert').count()).toBe(0);
    expect(proposal.derivation).toMatchObject({ k: 3, guardDb: 0.5, maxSegments: 12, smoothing: 6 });
    expect([...proposal.derivation.captureIds].sort()).toEqual(units.map((u) => captureOf.get(u)!).sort());

    // The breakpoints shown are the proposal's, rounded for review.
    for (const side of ['upper', 'lower'] as const) {
      const limit = proposal.check[side]!;
      expect(limit.length).toBeLessThanOrEqual(13);
      for (const p of limit) {
        expect(Number(p.hz.toPrecision(2))).toBe(p.hz);
        expect(Math.abs(p.db * 10 - Math.round(p.db * 10))).toBeLessThan(1e-9);
      }
      const shown = await wizard.getByRole('list', { name: `${side === 'upper' ? 'Upper' : 'Lower'} limit breakpoints` }).getByRole('listitem').allTextContents();
      expect(shown).toEqual(limit.map((p) => `${formatFrequency(p.hz)} ${formatMargin(p.db, 'dB')}`));
      // As read: two significant digits and whole 0.1 dB ("330 Hz +1.30 dB", "2.7 kHz −0.90 dB").
      for (const text of shown) {
        const [, value, unit] = /^(\d+(?:\.\d+)?) (k?Hz) [+−]\d+\.\d0 dB$/.exec(text) ?? [];
        const hz = Number(value) * (unit === 'kHz' ? 1000 : 1);
        expect(Number(hz.toPrecision(2)), text).toBe(hz);
      }
    }
    expect(await wizard.getByRole('heading', { name: /New check response — replaces its current limits/ }).count()).toBe(1);

    // The outlier: by name, where (around 7 kHz) and by how much.
    const outliers = wizard.getByRole('region', { name: 'Outlying golden captures' });
    const outlierText = (await outliers.textContent()) ?? '';
    expect(outlierText).toContain('One golden capture lies beyond 3σ of the others');
    expect(outlierText).toContain(`${OUTLIER} · evt2-48k`);
    expect(outlierText).toMatch(/kHz: \+\d\.\d\d dB \(\d+(\.\d+)?σ\) at (6|7|8)(\.\d+)? kHz/);
    for (const other of units.filter((u) => u !== OUTLIER)) expect(outlierText).not.toContain(other);
    expect(proposal.outliers.map((o) => o.captureId)).toEqual([captureOf.get(OUTLIER)]);

    // The yield estimate, and the guard slider moving it.
    const before = (await yieldText(wizard))!;
    expect(before).toMatch(/^about \d+(\.\d+)? % of good units would fail$/);
    const rateAt = (g: number) => {
      const row = proposal.yieldEstimate!.byGuardBandDb.find((r) => Math.abs(r.guardDb - g) < 1e-9)!;
      return row.parametric.rate;
    };
    expect(before).toBe(`about ${formatPercent(rateAt(0.5) * 100)} of good units would fail`);
    await screenshot(page, 'mask-derive');
    const slider = wizard.getByLabel('Guard band');
    await slider.focus();
    for (let i = 0; i < 5; i++) await page.keyboard.press('ArrowLeft');
    expect(await wizard.locator('output').textContent()).toBe('0.00 dB');
    const atZero = (await yieldText(wizard))!;
    expect(atZero).toBe(`about ${formatPercent(rateAt(0) * 100)} of good units would fail`);
    expect(atZero).not.toBe(before);
    // Once the slider rests, the limits are derived again at 0 dB and the draft can take them.
    const rederived = page.waitForResponse((r) => r.url().endsWith('/masks/derive'));
    expect((await rederived).request().postDataJSON()).toMatchObject({ guardDb: 0 });
    const atZeroDerived = DeriveMaskResponse.parse(await (await rederived).json());
    await expect.poll(() => wizard.getByRole('button', { name: 'Use as draft' }).isEnabled(), { timeout: 30_000 }).toBe(true);
    // Now read from the new proposal's own table (a shifted guard equals a re-derivation up to the 0.1 dB rounding).
    expect(await yieldText(wizard)).toBe(`about ${formatPercent(atZeroDerived.yieldEstimate!.parametric.rate * 100)} of good units would fail`);
    expect(await noOverflow(page)).toBe(true);

    // The same wizard on a phone: the estimate readable, nothing wider than the screen.
    await page.setViewportSize({ width: 390, height: 844 });
    const status = wizard.getByRole('region', { name: 'Yield estimate' }).getByRole('status');
    await status.scrollIntoViewIfNeeded();
    expect(await status.isVisible()).toBe(true);
    expect(await noOverflow(page)).toBe(true);
    const box = (await wizard.boundingBox())!;
    expect(box.x).toBeGreaterThanOrEqual(0);
    expect(box.x + box.width).toBeLessThanOrEqual(390);
    await page.setViewportSize({ width: 1440, height: 900 });
  });

  it('leaves the outlier out on request and replaces the envelope in the saved draft', async () => {
    const wizard = page.getByRole('dialog', { name: 'Derive limits from golden captures' });
    const derived = page.waitForResponse((r) => r.url().endsWith('/masks/derive'));
    await wizard.getByRole('region', { name: 'Outlying golden captures' }).getByRole('button', { name: 'Leave out and derive again' }).click();
    const body = (await derived).request().postDataJSON() as { captureIds: string[] };
    expect(body.captureIds).toHaveLength(units.length - 1);
    expect(body.captureIds).not.toContain(captureOf.get(OUTLIER));
    await expect.poll(() => wizard.getByRole('region', { name: 'Outlying golden captures' }).count(), { timeout: 20_000 }).toBe(0);
    await expect.poll(() => wizard.getByRole('button', { name: 'Use as draft' }).isEnabled(), { timeout: 20_000 }).toBe(true);
    const shownUpper = await wizard.getByRole('list', { name: 'Upper limit breakpoints' }).getByRole('listitem').allTextContents();
    await wizard.getByRole('button', { name: 'Use as draft' }).click();
    await page.getByText('Derived limits in the draft').first().waitFor();
    await page.getByRole('button', { name: 'Save draft' }).click();
    await expect.poll(() => page.getByText('Unsaved changes').count(), { timeout: 10_000 }).toBe(0);

    const saved = MaskRevisionDto.parse(await api('GET', `/api/projects/${project}/test-cases/${caseKey}/masks/1`, qaToken));
    expect(saved.checks.map((c) => c.id)).toEqual(['response', 'level']);
    const response = saved.checks[0] as MagnitudeEnvelopeCheck;
    expect(response.label).toBe('Derived from 8 golden captures: mean ± (3σ + 0 dB)');
    expect(response.upper!.map((p) => `${formatFrequency(p.hz)} ${formatMargin(p.db, 'dB')}`)).toEqual(shownUpper);
    // The preview under the editor now draws the new limits, not the old ±1.5 dB.
    await page.getByRole('figure', { name: 'Limit preview' }).waitFor();
  });

  it('adds the derived check beside the others when asked', async () => {
    const wizard = await openWizard(page);
    await choose(wizard, units.filter((u) => u !== OUTLIER));
    await wizard.getByRole('radio', { name: 'Add beside the other checks' }).check();
    await previewLimits(page, wizard);
    expect(await wizard.getByRole('heading', { name: /New check derived-envelope — added beside the other checks/ }).count()).toBe(1);
    await expect.poll(() => wizard.getByRole('button', { name: 'Use as draft' }).isEnabled(), { timeout: 20_000 }).toBe(true);
    await wizard.getByRole('button', { name: 'Use as draft' }).click();
    await page.getByRole('button', { name: 'Save draft' }).click();
    await expect.poll(() => page.getByText('Unsaved changes').count(), { timeout: 10_000 }).toBe(0);
    const saved = MaskRevisionDto.parse(await api('GET', `/api/projects/${project}/test-cases/${caseKey}/masks/1`, qaToken));
    expect(saved.checks.map((c) => c.id)).toEqual(['response', 'level', 'derived-envelope']);
    await page.setViewportSize({ width: 1280, height: 900 });
    expect(await noOverflow(page)).toBe(true);
    await page.setViewportSize({ width: 390, height: 844 });
    expect(await noOverflow(page)).toBe(true);
  });

  it('wrote no console errors in any page', () => {
    expect(errors).toEqual([]);
  });
});
