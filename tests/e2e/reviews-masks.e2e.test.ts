import fs from 'node:fs';
import { formatFrequency, formatNumberIn, isEngineSelfTest, type FindingRow, type ImpactRunDto, type LimitPoint, type MaskCheck, type MaskRevisionDto, type WaiverDto } from '@earmark/contracts';
import { DEMO_PASSWORD } from '@earmark/db';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { screenshot, screenshotsDir, signedInPage } from '../support/browser-session.js';
import { startDemoHistory } from '../support/demo-history.js';
import type { Stack } from '../support/stack.js';

/**
 * Reviews and the mask editor in a real browser: an engineer edits a copy of the approved
 * mask (labels with units, 1/N-octave smoothing, no engine self-test, the unsaved-changes
 * guard) and submits it; a QA manager reads the change in words over the old and new limits,
 * confirms the approval against the impact numbers; a second waiver request is refused in
 * words with a link to the first. Toasts, overflow at 1280 and 390 px, and console errors checked.
 */
let stack: Stack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
const errors: string[] = [];
const project = '/api/projects/kestrel-buds';
const caseKey = 'eq.music.sweep';
const masksUrl = () => `${stack.url}/projects/kestrel-buds/test-cases/${caseKey}/masks`;

async function login(email: string): Promise<string> {
  const res = await fetch(`${stack.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: DEMO_PASSWORD }) });
  expect(res.status).toBe(200);
  return ((await res.json()) as { accessToken: string }).accessToken;
}

async function get<T>(token: string, path: string): Promise<T> {
  const res = await fetch(`${stack.url}${path}`, { headers: { authorization: `Bearer ${token}` } });
  expect(res.status, path).toBe(200);
  return (await res.json()) as T;
}

/**
 * Whether the document fits the width once layout has settled (plots follow their frame through a
 * ResizeObserver, a frame or two after the resize). On failure it names the elements sticking out.
 */
async function noDocumentOverflow(page: Page, width: number): Promise<boolean> {
  await page.setViewportSize({ width, height: 900 });
  const fits = () => page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth);
  for (const deadline = Date.now() + 5000; Date.now() < deadline; await page.waitForTimeout(200)) if (await fits()) return true;
  const wide = await page.evaluate(() =>
    Array.from(document.querySelectorAll('body *'))
      .filter((el) => el.getBoundingClientRect().right > window.innerWidth + 1)
      .slice(-5)
      .map((el) => `${el.tagName.toLowerCase()}.${String(el.className).slice(0, 80)} right=${Math.round(el.getBoundingClientRect().right)}`),
  );
  console.warn(`document wider than ${width} px:`, wide);
  return false;
}

const toast = (page: Page, text: string | RegExp) => page.getByRole('region', { name: /Notifications/ }).getByText(text).first();

beforeAll(async () => {
  fs.mkdirSync(screenshotsDir, { recursive: true });
  stack = await startDemoHistory();
  browser = await launchBrowser();
  // The demo history takes ~1 min on an idle machine; more when other suites share the cores.
}, 900_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

describe('reviews and the mask editor in the browser', () => {
  let approved: MaskRevisionDto;
  let revision = 0;
  let envelopeId = '';
  let expectedSentence = '';

  it('edits a copy of the approved mask in words and units, guards unsaved edits, and submits it', async () => {
    const token = await login('engineer@fernwick.test');
    const { items } = await get<{ items: MaskRevisionDto[] }>(token, `${project}/test-cases/${caseKey}/masks`);
    approved = items.find((r) => r.state === 'approved' && r.target === null)!;
    expect(approved).toBeDefined();
    // The copy leaves any engine self-test out, so the envelope's number is its place among the rest.
    const kept = approved.checks.filter((c) => !isEngineSelfTest(c));
    const index = kept.findIndex((c) => c.kind === 'magnitude-envelope' && (c.upper?.length ?? 0) >= 2);
    expect(index).toBeGreaterThanOrEqual(0);
    const envelope = kept[index] as Extract<MaskCheck, { kind: 'magnitude-envelope' }>;
    envelopeId = envelope.id;
    const pointIndex = Math.floor((envelope.upper!.length - 1) / 2);
    const point = envelope.upper![pointIndex] as LimitPoint;
    const newDb = Math.round((point.db - 0.5) * 100) / 100;
    const unit = envelope.measure === 'level' ? 'dBFS' : 'dB';
    expectedSentence = `upper limit at ${formatFrequency(point.hz)}: ${formatNumberIn(point.db, unit, true)} → ${formatNumberIn(newDb, unit, true)} ${unit}`;

    const page = await signedInPage(browser.context, stack.url, 'engineer@fernwick.test', errors);
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${masksUrl()}?rev=${approved.revision}`);
    await page.getByRole('heading', { name: `Masks — ${caseKey}` }).waitFor();
    // Read-only: every metric in words, no slug, no input cutting a value off.
    const readOnly = page.getByRole('table', { name: 'Checks editor' });
    await readOnly.waitFor();
    expect(await readOnly.textContent()).not.toMatch(/\b(rms-dbfs|peak-dbfs|thdn-db|thd-percent|snr-db|noise-floor-dbfs)\b/);
    // Settings read as text: no select (or input cut to its width) in a revision the user cannot edit.
    expect(await readOnly.getByRole('combobox').count()).toBe(0);

    await page.getByRole('button', { name: 'Copy to new draft' }).click();
    const copied = toast(page, /^Copied to a new draft, revision \d+$/);
    await copied.waitFor();
    revision = Number((await copied.textContent())!.match(/\d+$/)![0]);
    await page.getByRole('heading', { name: `Revision ${revision}` }).waitFor();
    const editor = page.getByRole('table', { name: 'Checks editor' });
    const n = index + 1;

    // Smoothing reads 1/N octave, never a bare N.
    const smoothing = editor.getByRole('combobox', { name: `Smoothing of check ${n}` });
    expect(await smoothing.locator('option').allTextContents()).toEqual(['none', '1 octave', '1/3 octave', '1/6 octave', '1/12 octave', '1/24 octave']);
    expect(await smoothing.evaluate((s: HTMLSelectElement) => s.selectedOptions[0]?.textContent)).toMatch(/^(none|1 octave|1\/\d+ octave)$/);

    // A new level check offers labels with units and no engine self-test.
    await page.getByLabel('Kind of check').selectOption('level');
    await page.getByRole('button', { name: 'Add check' }).click();
    const added = kept.length + 1;
    const metric = editor.getByRole('combobox', { name: `Metric of check ${added}` });
    expect(await metric.locator('option').allTextContents()).toEqual(['—', 'RMS level (dBFS)', 'Peak level (dBFS)', 'Crest factor (dB)']);
    expect(await metric.locator('option[value="energy-parseval"]').count()).toBe(0);
    await editor.getByRole('textbox', { name: `Min (dBFS) of check ${added}` }).waitFor();
    await editor.getByRole('button', { name: `Remove check ${added}` }).click();

    // Tighten one upper-limit point.
    const cell = editor.getByRole('textbox', { name: `Upper limit of check ${n} point ${pointIndex + 1} level (dB)` });
    await cell.fill(String(newDb));
    await page.getByText('Unsaved changes').waitFor();

    // Leaving asks first; staying keeps the edit.
    await page.getByRole('link', { name: 'Test cases' }).first().click();
    const prompt = page.getByRole('dialog', { name: 'Leave without saving?' });
    await prompt.waitFor();
    expect(await prompt.textContent()).toContain('This draft has changes that are not saved.');
    await prompt.getByRole('button', { name: 'Stay and keep editing' }).click();
    await prompt.waitFor({ state: 'hidden' });
    expect(new URL(page.url()).pathname).toBe(`/projects/kestrel-buds/test-cases/${caseKey}/masks`);
    expect(await cell.inputValue()).toBe(String(newDb));

    await screenshot(page, 'mask-editor');
    expect(await noDocumentOverflow(page, 1440)).toBe(true);
    expect(await noDocumentOverflow(page, 1280)).toBe(true);
    expect(await noDocumentOverflow(page, 390)).toBe(true);
    await page.setViewportSize({ width: 1440, height: 900 });

    await page.getByRole('button', { name: 'Save draft' }).click();
    await toast(page, `Draft saved as revision ${revision}`).waitFor();
    await page.getByRole('button', { name: 'Submit for review' }).click();
    await toast(page, `Revision ${revision} submitted for review`).waitFor();
    await page.getByText(/in review/i).first().waitFor();
    await page.close();
  });

  it('shows the change in words over old and new limits, and confirms the approval with the impact numbers', async () => {
    expect(revision).toBeGreaterThan(approved.revision);
    const page = await signedInPage(browser.context, stack.url, 'qa@fernwick.test', errors);
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${stack.url}/projects/kestrel-buds/approvals`);
    const card = page.getByRole('article', { name: `Revision ${revision} of ${caseKey}` });
    await card.waitFor();

    const words = card.getByRole('list', { name: 'Changes in words' });
    await words.waitFor();
    expect(await words.locator('[data-change-text]').allTextContents()).toContain(expectedSentence);
    expect(await words.textContent()).not.toMatch(/upper\.\d+\.db/);
    expect(await card.getByRole('heading', { name: /What changes/ }).textContent()).toBe(`What changes against revision ${approved.revision}`);

    // Old limits dashed, new solid, over a capture picked from recent builds.
    const overlay = card.getByRole('region', { name: `Old and new limits of ${envelopeId}` });
    await overlay.getByRole('figure', { name: `Old and new limits of ${envelopeId}` }).waitFor({ timeout: 30_000 });
    const legend = overlay.getByRole('list', { name: 'Legend' }).getByRole('listitem');
    expect(await legend.nth(1).textContent()).toBe(`Old limits (revision ${approved.revision})`);
    expect(await legend.nth(2).textContent()).toBe(`New limits (revision ${revision})`);
    expect(await legend.nth(0).textContent()).toMatch(/^Capture [0-9a-f]{7}$/);
    const picker = overlay.getByLabel('Capture to draw under the limits');
    const options = await picker.locator('option').evaluateAll((o) => (o as HTMLOptionElement[]).map((x) => ({ value: x.value, text: x.textContent ?? '' })));
    expect(options.length).toBeGreaterThan(1);
    await picker.selectOption(options[1]!.value);
    await expect.poll(() => legend.nth(0).textContent()).toBe(`Capture ${options[1]!.text.slice(0, 7)}`);

    // The impact run, then the confirmation quoting it.
    await card.getByRole('button', { name: 'Run impact' }).click();
    await card.getByRole('table', { name: `Impact of revision ${revision} per build` }).waitFor({ timeout: 90_000 });
    const token = await login('qa@fernwick.test');
    const [run] = (await get<{ items: ImpactRunDto[] }>(token, `${project}/test-cases/${caseKey}/masks/${revision}/impact`)).items;
    const summary = run!.result!.summary;
    const builds = `${summary.builds} ${summary.builds === 1 ? 'build' : 'builds'}`;
    const expectedImpact =
      summary.passToFail === 0 && summary.failToPass === 0
        ? `Of the last ${builds} (${summary.captures} captures), none would change verdict.`
        : `Of the last ${builds} (${summary.captures} captures), ${summary.passToFail} would newly fail and ${summary.failToPass} would newly pass.`;

    await card.evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await screenshot(page, 'approvals');

    expect(await noDocumentOverflow(page, 1280)).toBe(true);
    expect(await noDocumentOverflow(page, 390)).toBe(true);
    expect(await words.locator('[data-change-text]').allTextContents()).toContain(expectedSentence);
    await page.setViewportSize({ width: 1440, height: 900 });

    await card.getByRole('button', { name: 'Approve' }).click();
    const confirm = page.getByRole('dialog', { name: `Approve revision ${revision} of ${caseKey}?` });
    await confirm.waitFor();
    expect(await confirm.getByRole('note', { name: 'Impact summary' }).textContent()).toContain(expectedImpact);
    await confirm.getByRole('button', { name: `Approve revision ${revision}` }).click();
    await toast(page, `Revision ${revision} of ${caseKey}: approved`).waitFor();
    await toast(page, `It now judges new captures of ${caseKey}.`).waitFor();
    await expect.poll(() => page.getByRole('article', { name: `Revision ${revision} of ${caseKey}` }).count(), { timeout: 15_000 }).toBe(0);
    await page.close();
  });

  it('refuses a second waiver request in words, with a working link to the first', async () => {
    const token = await login('engineer@fernwick.test');
    const { items } = await get<{ items: FindingRow[] }>(token, `${project}/findings?state=open&pageSize=50`);
    // A finding nobody has asked a waiver for yet (the demo may hold some requests).
    const waived = new Set(
      (await Promise.all(['requested', 'active'].map((state) => get<{ items: WaiverDto[] }>(token, `${project}/waivers?state=${state}`)))).flatMap((l) => l.items.map((w) => w.findingId)),
    );
    const finding = items.find((f) => !waived.has(f.id))!;
    expect(finding).toBeDefined();
    const page = await signedInPage(browser.context, stack.url, 'engineer@fernwick.test', errors);
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${stack.url}/projects/kestrel-buds/builds/${finding.buildSha}/captures/${finding.captureId}`);
    const row = page.locator(`[data-finding-id="${finding.id}"]`);
    const what = `${finding.checkId} on ${finding.testCase}`;

    await row.getByRole('button', { name: 'Request waiver' }).click();
    let dialog = page.getByRole('dialog', { name: 'Request a waiver' });
    await dialog.getByLabel('Reason').fill('Known resonance of the rev B shell; fixed in the next tooling.');
    await dialog.getByRole('button', { name: 'Send for approval' }).click();
    await toast(page, `Waiver of ${what} requested`).waitFor();
    await dialog.waitFor({ state: 'hidden' });

    await row.getByRole('button', { name: 'Request waiver' }).click();
    dialog = page.getByRole('dialog', { name: 'Request a waiver' });
    await dialog.getByLabel('Reason').fill('Asking again.');
    await dialog.getByRole('button', { name: 'Send for approval' }).click();
    const notice = dialog.getByRole('alert').filter({ hasText: 'A waiver for this check already exists' });
    await notice.waitFor();
    const text = (await notice.textContent())!;
    const today = new Date().toISOString().slice(0, 10);
    expect(text).toContain(`The ${finding.checkId} check of this finding already has a waiver awaiting a QA manager’s decision: requested by engineer@fernwick.test on ${today}, to run until `);
    expect(text).not.toMatch(/[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-/);

    const { items: requested } = await get<{ items: WaiverDto[] }>(token, `${project}/waivers?state=requested`);
    const first = requested.find((w) => w.findingId === finding.id)!;
    await notice.getByRole('link', { name: 'Open the waiver awaiting review' }).click();
    await page.waitForURL(`**/projects/kestrel-buds/approvals#waiver-${first.id}`);
    const card = page.locator(`article#waiver-${first.id}`);
    await card.waitFor();
    expect(await card.getAttribute('aria-current')).toBe('true');
    expect(await card.getAttribute('aria-label')).toBe(`Waiver of ${finding.checkId} on ${finding.testCase}`);
    expect(await card.getByRole('button', { name: 'Approve' }).count()).toBe(0);
    expect(await noDocumentOverflow(page, 1280)).toBe(true);
    expect(await noDocumentOverflow(page, 390)).toBe(true);
    await page.close();
  });

  it('wrote no console errors in any page (the refused second request’s 409 aside)', () => {
    // Chromium logs every 4xx response as a console error; the 409 above is the refusal under test.
    const conflicts = errors.filter((e) => /status of 409 \(Conflict\)/.test(e));
    expect(conflicts.length).toBeLessThanOrEqual(1);
    expect(errors.filter((e) => !/status of 409 \(Conflict\)/.test(e))).toEqual([]);
  });
});
