import fs from 'node:fs';
import { MAIN_BRANCH, StimulusSpec, type FindingsPage, type ProjectOverview } from '@earmark/contracts';
import { DEMO_PASSWORD } from '@earmark/db';
import { encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { screenshot, screenshotsDir, signedInPage } from '../support/browser-session.js';
import { startDemoHistory } from '../support/demo-history.js';
import type { Stack } from '../support/stack.js';
import { waitFor } from '../support/wait-for.js';

/**
 * The project overview as the landing page, the findings triage by branch, and the shell at phone
 * width, in Chromium over the demo history. A small history of our own (pass, pass, fail, fail on
 * main) checks that the overview names the third build as the one the failure began with.
 */
const PROJECT = 'kestrel-buds';
const CASE = 'bench.level.e2e';
const TARGET = 'bench-e2e';
const HISTORY = [
  { sha: 'e2e0a11ce1', fails: false },
  { sha: 'e2e0a11ce2', fails: false },
  { sha: 'e2e0a11ce3', fails: true },
  { sha: 'e2e0a11ce4', fails: true },
];
const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: 48000, seconds: 0.5, frequency: 997, levelDbfs: -12 });
const played = stimulusAsPlayed(spec).channels[0]!;
/** As played (about −15 dBFS RMS), or 26 dB quieter: below the mask's −30 dBFS floor. */
const captureOf = (fails: boolean) => Buffer.from(encodeWav([fails ? played.map((x) => x * 0.05) : played], 48000, { bitsPerSample: 24 }));

let stack: Stack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
const consoleErrors: string[] = [];
const pageAs = (email: string): Promise<Page> => signedInPage(browser.context, stack.url, email, consoleErrors);

async function api<T = unknown>(method: string, path: string, token: string, body?: unknown): Promise<T> {
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
  const res = await fetch(`${stack.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: DEMO_PASSWORD }) });
  return ((await res.json()) as { accessToken: string }).accessToken;
}

/** A build on main with one capture of our test case, uploaded with the CI token; resolves with its verdict. */
async function submitBuild(sha: string, fails: boolean): Promise<string> {
  await api('POST', `/api/v1/projects/${PROJECT}/builds`, stack.ciToken, { sha, branch: MAIN_BRANCH, label: `e2e ${sha.slice(-1)}` });
  const res = await fetch(`${stack.url}/api/v1/projects/${PROJECT}/builds/${sha}/captures?testCase=${CASE}&target=${TARGET}`, {
    method: 'POST',
    headers: { authorization: `Bearer ${stack.ciToken}`, 'content-type': 'audio/wav' },
    body: captureOf(fails),
  });
  const created = (await res.json()) as { id: string };
  expect(res.status, JSON.stringify(created)).toBe(202);
  return waitFor(async () => {
    const c = await api<{ verdict: { outcome: string } | null; status: string }>('GET', `/api/v1/captures/${created.id}`, stack.ciToken);
    return c.verdict && c.status !== 'queued' && c.status !== 'analysing' ? c.verdict.outcome : null;
  }, { timeoutMs: 60_000, what: `the verdict of ${sha}` });
}

async function noDocumentOverflow(page: Page, width: number): Promise<void> {
  await page.setViewportSize({ width, height: 900 });
  await page.waitForTimeout(200);
  const widths = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, inner: window.innerWidth }));
  expect(widths.scroll, `${page.url()}: document ${widths.scroll} px wide at ${width} px`).toBeLessThanOrEqual(widths.inner);
}

/** The number the menu item shows (none when nothing needs attention). */
async function navCount(page: Page, label: string): Promise<number> {
  const badge = page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: label, exact: true }).locator('[data-nav-count]');
  return (await badge.count()) === 0 ? 0 : Number(await badge.textContent());
}

const statusLabel: Record<string, string> = { pass: 'Pass', fail: 'Fail', error: 'Error', pending: 'Pending', running: 'Running' };

beforeAll(async () => {
  fs.mkdirSync(screenshotsDir, { recursive: true });
  stack = await startDemoHistory();
  browser = await launchBrowser();
}, 240_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

describe('the overview as the landing page, triage by branch, the shell at 390 px', () => {
  it("lands on the overview from the project list, shows main's verdict and the menu's counts as the API reports them", async () => {
    const qa = await login('qa@fernwick.test');
    const overview = await api<ProjectOverview>('GET', `/api/projects/${PROJECT}/overview`, qa);
    const page = await pageAs('qa@fernwick.test');
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.getByRole('link', { name: 'Kestrel Buds' }).click();
    await page.waitForURL(`${stack.url}/projects/${PROJECT}`);
    const latest = page.getByRole('region', { name: /Latest on main/ });
    await latest.waitFor();
    expect(await latest.getAttribute('aria-labelledby')).toBe('main-verdict');
    expect(overview.main).not.toBeNull();
    expect(await latest.locator('[data-main-status]').getAttribute('data-main-status')).toBe(overview.main!.status);
    expect(await latest.textContent()).toContain(statusLabel[overview.main!.status]);
    expect(await latest.textContent()).toContain(overview.main!.sha.slice(0, 7));
    // The branches with their trend marks: main first, each mark a link to its build.
    const branches = page.getByRole('region', { name: 'Branches' });
    expect(await branches.locator('[data-branch]').evaluateAll((rows) => rows.map((r) => (r as HTMLElement).dataset.branch))).toEqual(overview.branches.map((b) => b.branch));
    const mainMarks = branches.locator('[data-branch="main"] [data-trend-mark]');
    expect(await mainMarks.evaluateAll((marks) => marks.map((m) => (m as HTMLElement).dataset.trendMark))).toEqual(overview.branches[0]!.marks.map((m) => m.status));
    // The menu's counts are the API's.
    await page.waitForLoadState('networkidle');
    expect(await navCount(page, 'Findings')).toBe(overview.counts.openFindingsOnMain);
    expect(await navCount(page, 'Approvals')).toBe(overview.counts.awaitingYou);
    const awaiting = page.getByRole('region', { name: /Awaiting your decision/ });
    expect(await awaiting.locator('[data-awaiting]').count()).toBe(overview.awaiting.length);
    await screenshot(page, 'overview');
    await noDocumentOverflow(page, 1280);
    await noDocumentOverflow(page, 390);
    await page.close();
  });

  it('lists findings by branch, main by default, with first sighting, occurrences and "since"; bulk actions fit at 1280 px', async () => {
    const engineer = await login('engineer@fernwick.test');
    const overview = await api<ProjectOverview>('GET', `/api/projects/${PROJECT}/overview`, engineer);
    const onMain = await api<FindingsPage>('GET', `/api/projects/${PROJECT}/findings?state=active&branch=main&pageSize=50`, engineer);
    const page = await pageAs('engineer@fernwick.test');
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${stack.url}/projects/${PROJECT}/findings`);
    const table = page.getByRole('table', { name: 'Findings' });
    await table.waitFor();
    expect(await page.getByLabel('Branch').inputValue()).toBe('main');
    const headers = await table.getByRole('columnheader').allTextContents();
    expect(headers.slice(1, 3)).toEqual(['Finding', 'State']);
    const branchColumn = headers.indexOf('Branch');
    const rows = table.locator('tbody tr');
    expect(await rows.count()).toBe(onMain.items.length);
    for (let i = 0; i < (await rows.count()); i += 1) expect((await rows.nth(i).locator('td').nth(branchColumn).textContent())?.trim()).toBe('main');
    // Occurrences and "since" as the API counted them, row by row.
    const shown = await rows.evaluateAll((trs) => trs.map((tr) => ({ id: (tr as HTMLElement).dataset.findingId, seen: tr.querySelector('[data-occurrences]')?.getAttribute('data-occurrences'), since: tr.querySelector('[data-failing-since]')?.getAttribute('data-failing-since') ?? null })));
    expect(shown).toEqual(onMain.items.map((f) => ({ id: f.id, seen: String(f.occurrences), since: f.failingSince?.sha ?? null })));
    await screenshot(page, 'findings');

    // Another branch: its own findings only.
    const other = overview.branches.find((b) => b.branch !== MAIN_BRANCH);
    if (other) {
      const onOther = await api<FindingsPage>('GET', `/api/projects/${PROJECT}/findings?state=active&branch=${encodeURIComponent(other.branch)}`, engineer);
      await page.getByLabel('Branch').selectOption(other.branch);
      await page.waitForURL((url) => url.searchParams.get('branch') === other.branch);
      await waitFor(async () => (await rows.count()) === onOther.items.length && (onOther.items.length === 0 || (await rows.first().getAttribute('data-finding-id')) === onOther.items[0]!.id), { timeoutMs: 10_000, what: `the findings of ${other.branch}` });
      const empty = await page.getByText('No findings match').count() + (await page.getByText('Nothing needs a human').count());
      if (onOther.items.length > 0) expect((await rows.first().locator('td').nth(branchColumn).textContent())?.trim()).toBe(other.branch);
      else expect(empty).toBeGreaterThan(0);
      await page.getByLabel('Branch').selectOption('main');
      await table.waitFor();
    }

    // Bulk actions at 1280 px: the toolbar wraps inside the page and the document does not overflow.
    await page.setViewportSize({ width: 1280, height: 900 });
    if (onMain.items.length > 0) {
      await table.getByRole('checkbox', { name: 'Select all findings on this page' }).check();
      const bar = page.getByRole('region', { name: 'Bulk actions' });
      await bar.waitFor();
      const box = (await bar.boundingBox())!;
      expect(box.x + box.width).toBeLessThanOrEqual(1280);
      await bar.getByRole('button', { name: 'Assign' }).waitFor();
    }
    await noDocumentOverflow(page, 1280);
    await noDocumentOverflow(page, 390);
    // At 390 px the table scrolls in its own frame, with Finding and State in view.
    const stateHeader = (await table.getByRole('columnheader', { name: 'State' }).boundingBox())!;
    expect(stateHeader.x + stateHeader.width).toBeLessThanOrEqual(390);
    await page.close();
  });

  it('fits the navigation and the builds table into 390 px', async () => {
    const page = await pageAs('qa@fernwick.test');
    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(`${stack.url}/projects/${PROJECT}`);
    await page.getByRole('region', { name: /Latest on main/ }).waitFor();
    await page.waitForLoadState('networkidle');
    await screenshot(page, 'overview-phone');
    await noDocumentOverflow(page, 390);
    // The menu folds behind a button; opened, every item is on screen, none cut off.
    const menu = page.getByRole('button', { name: 'Menu' });
    expect(await menu.getAttribute('aria-expanded')).toBe('false');
    expect(await page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(false);
    await menu.click();
    const links = page.getByRole('navigation', { name: 'Main' }).getByRole('link');
    const labels = await links.allTextContents();
    expect(labels.map((l) => l.replace(/\d+$/, ''))).toEqual(expect.arrayContaining(['Projects', 'Overview', 'Builds', 'Findings', 'Test cases', 'Approvals', 'Audit log']));
    for (let i = 0; i < (await links.count()); i += 1) {
      const box = (await links.nth(i).boundingBox())!;
      expect(box.x >= 0 && box.x + box.width <= 390, `${labels[i]} at ${box.x}+${box.width}`).toBe(true);
    }
    await links.filter({ hasText: 'Builds' }).click();
    await page.getByRole('heading', { name: 'Builds' }).waitFor();
    expect(await menu.getAttribute('aria-expanded')).toBe('false');
    const table = page.getByRole('table', { name: 'Builds' });
    await table.locator('tbody tr').first().waitFor();
    const status = (await table.getByRole('columnheader', { name: /^Status/ }).boundingBox())!;
    expect(status.x + status.width, 'Status header within the phone screen').toBeLessThanOrEqual(390);
    const firstStatus = (await table.locator('tbody tr').first().locator('td').nth(1).boundingBox())!;
    expect(firstStatus.x + firstStatus.width).toBeLessThanOrEqual(390);
    await noDocumentOverflow(page, 390);
    await page.setViewportSize({ width: 1440, height: 900 });
    await screenshot(page, 'builds');
    await noDocumentOverflow(page, 1280);
    await page.close();
  });

  it('names the build a failure began with: pass, pass, fail, fail on main → since the third', async () => {
    const engineer = await login('engineer@fernwick.test');
    const qa = await login('qa@fernwick.test');
    await api('POST', `/api/projects/${PROJECT}/targets`, engineer, { key: TARGET, name: 'Bench rig (e2e)', sampleRate: null });
    await api('POST', `/api/projects/${PROJECT}/test-cases`, engineer, { key: CASE, name: 'Bench level, e2e', stimulus: spec, channelMap: [0] });
    const draft = await api<{ revision: number }>('POST', `/api/projects/${PROJECT}/test-cases/${CASE}/masks`, engineer, {
      checks: [{ id: 'bench-level', kind: 'level', label: 'Bench level', metric: 'rms-dbfs', min: -30 }],
      note: 'e2e floor',
    });
    await api('POST', `/api/projects/${PROJECT}/test-cases/${CASE}/masks/${draft.revision}/submit`, engineer);
    await api('POST', `/api/projects/${PROJECT}/test-cases/${CASE}/masks/${draft.revision}/approve`, qa, {});
    for (const build of HISTORY) expect(await submitBuild(build.sha, build.fails)).toBe(build.fails ? 'fail' : 'pass');

    const overview = await api<ProjectOverview>('GET', `/api/projects/${PROJECT}/overview`, qa);
    expect(overview.main).toMatchObject({ sha: HISTORY[3]!.sha, status: 'fail' });
    const ours = overview.failing.find((f) => f.testCase === CASE);
    expect(ours).toMatchObject({ checkId: 'bench-level', since: { sha: HISTORY[2]!.sha }, latest: { sha: HISTORY[3]!.sha }, streak: 2, unit: 'dB' });

    const page = await pageAs('qa@fernwick.test');
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${stack.url}/projects/${PROJECT}`);
    const latest = page.getByRole('region', { name: /Latest on main/ });
    await latest.waitFor();
    expect(await latest.locator('[data-main-status]').getAttribute('data-main-status')).toBe('fail');
    expect(await latest.textContent()).toContain(HISTORY[3]!.sha.slice(0, 7));
    const failing = page.getByRole('region', { name: /Failing on main now/ });
    const item = failing.locator('[data-failing-check="bench-level"]');
    await item.waitFor();
    expect(await item.locator('[data-since]').getAttribute('data-since')).toBe(HISTORY[2]!.sha);
    const text = (await item.textContent()) ?? '';
    expect(text).toContain('Bench level');
    expect(text).toContain(`failing since ${HISTORY[2]!.sha.slice(0, 7)}`);
    expect(text).toContain('2 builds');
    // The margin in the one formatter: a dBFS check's margin is in dB, signed with the real minus.
    expect(text).toMatch(/−\d+\.\d\d dB/);
    await item.getByRole('link', { name: HISTORY[2]!.sha.slice(0, 7) }).click();
    await page.waitForURL(`${stack.url}/projects/${PROJECT}/builds/${HISTORY[2]!.sha}`);

    // Triage says the same: first seen at the third build, two occurrences, failing since the third.
    await page.goto(`${stack.url}/projects/${PROJECT}/findings?testCase=${CASE}`);
    const row = page.getByRole('table', { name: 'Findings' }).locator('tbody tr').first();
    await row.waitFor();
    expect(await row.locator('[data-failing-since]').getAttribute('data-failing-since')).toBe(HISTORY[2]!.sha);
    expect(await row.locator('[data-occurrences]').getAttribute('data-occurrences')).toBe('2');
    expect(await row.getByRole('link', { name: 'Bench level (level)' }).count()).toBe(1);
    expect(await navCount(page, 'Findings')).toBe(overview.counts.openFindingsOnMain);
    await page.close();
    expect(consoleErrors).toEqual([]);
  });
});
