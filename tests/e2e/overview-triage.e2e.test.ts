import fs from 'node:fs';
import { MAIN_BRANCH, StimulusSpec, type FindingsPage, type ProjectOverview } from '@earmark/contracts';
import { TEST_PASSWORD } from '@earmark/db';
import { encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { screenshot, screenshotsDir } from '../support/browser-session.js';
import { startStack, type Stack } from '../support/stack.js';
import { waitFor } from '../support/wait-for.js';

/**
 * The project overview as the landing page, the findings triage by branch, and the shell at phone
 * width, in Chromium. The history is made here through the CI API as a pipeline would: on main a
 * level check passes, passes, fails, fails (the overview must name the third build as the one the
 * failure began with); a feature branch fails on its own; an engineer asks for a waiver that the QA
 * manager may decide. (The demo history takes minutes on two busy cores; this takes seconds.)
 */
const PROJECT = 'alpha-dsp';
const CASE = 'bench.level';
const TARGET = 'bench-rig';
const FEATURE = 'feature/limiter-retune';
const HISTORY = [
  { sha: '3b9e1c0a01', label: 'nightly 101', branch: MAIN_BRANCH, fails: false },
  { sha: '5d27f4e802', label: 'nightly 102', branch: MAIN_BRANCH, fails: false },
  { sha: '7e4a0c9b13', label: 'nightly 103', branch: MAIN_BRANCH, fails: true },
  { sha: 'c4f1aa7e55', label: 'limiter retune', branch: FEATURE, fails: true },
  { sha: '9f03d2b6c4', label: 'nightly 104', branch: MAIN_BRANCH, fails: true },
];
const [, , third, feature, fourth] = HISTORY as [unknown, unknown, (typeof HISTORY)[number], (typeof HISTORY)[number], (typeof HISTORY)[number]];
const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: 48000, seconds: 0.5, frequency: 997, levelDbfs: -12 });
const played = stimulusAsPlayed(spec).channels[0]!;
/** As played (about −15 dBFS RMS), or 26 dB quieter: below the mask's −30 dBFS floor. */
const captureOf = (fails: boolean) => Buffer.from(encodeWav([fails ? played.map((x) => x * 0.05) : played], 48000, { bitsPerSample: 24 }));

let stack: Stack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
const consoleErrors: string[] = [];

async function pageAs(email: string, width = 1440, height = 900): Promise<Page> {
  const page = await browser.context.newPage();
  page.on('console', (msg) => {
    if (msg.type() === 'error') consoleErrors.push(`${email}: ${msg.text()}`);
  });
  page.on('pageerror', (error) => consoleErrors.push(`${email}: ${error.message}`));
  await page.setViewportSize({ width, height });
  await page.goto(`${stack.url}/`);
  await page.evaluate(() => localStorage.clear());
  await page.goto(`${stack.url}/sign-in`);
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(TEST_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('heading', { name: 'Projects' }).waitFor();
  return page;
}

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
  const res = await fetch(`${stack.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: TEST_PASSWORD }) });
  return ((await res.json()) as { accessToken: string }).accessToken;
}

/** A build with one capture of our test case, uploaded with the CI token; resolves with its verdict. */
async function submitBuild({ sha, label, branch, fails }: (typeof HISTORY)[number]): Promise<string> {
  await api('POST', `/api/v1/projects/${PROJECT}/builds`, stack.ciToken, { sha, branch, label });
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
  stack = await startStack({ seed: 'roles' });
  await stack.startWorker();
  browser = await launchBrowser();
  const engineer = await login('engineer@example.test');
  const qa = await login('qa_manager@example.test');
  await api('POST', `/api/projects/${PROJECT}/targets`, engineer, { key: TARGET, name: 'Bench rig', sampleRate: null });
  await api('POST', `/api/projects/${PROJECT}/test-cases`, engineer, { key: CASE, name: 'Bench level, 997 Hz tone', stimulus: spec, channelMap: [0] });
  const draft = await api<{ revision: number }>('POST', `/api/projects/${PROJECT}/test-cases/${CASE}/masks`, engineer, {
    checks: [{ id: 'bench-level', kind: 'level', label: 'Bench level', metric: 'rms-dbfs', min: -30 }],
    note: 'e2e floor',
  });
  await api('POST', `/api/projects/${PROJECT}/test-cases/${CASE}/masks/${draft.revision}/submit`, engineer);
  await api('POST', `/api/projects/${PROJECT}/test-cases/${CASE}/masks/${draft.revision}/approve`, qa, {});
  for (const build of HISTORY) expect(await submitBuild(build)).toBe(build.fails ? 'fail' : 'pass');
  // The engineer asks for a waiver of main's finding: one decision awaits the QA manager.
  const [finding] = (await api<FindingsPage>('GET', `/api/projects/${PROJECT}/findings?branch=main`, engineer)).items;
  await api('POST', `/api/projects/${PROJECT}/findings/${finding!.id}/waivers`, engineer, { reason: 'Bench rig attenuator under repair', until: '2099-01-31' });
}, 240_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

describe('the overview as the landing page, triage by branch, the shell at 390 px', () => {
  it("lands on the overview from the project list: main's verdict, failing since the third build, trends and the menu's counts as the API reports them", async () => {
    const qa = await login('qa_manager@example.test');
    const overview = await api<ProjectOverview>('GET', `/api/projects/${PROJECT}/overview`, qa);
    expect(overview.main).toMatchObject({ sha: fourth.sha, status: 'fail' });
    expect(overview.failing.map((f) => [f.checkId, f.since.sha, f.latest.sha, f.streak])).toEqual([['bench-level', third.sha, fourth.sha, 2]]);
    expect(overview.counts).toEqual({ awaitingYou: 1, openFindingsOnMain: 1 });

    const page = await pageAs('qa_manager@example.test');
    await page.getByRole('link', { name: 'Alpha DSP' }).click();
    await page.waitForURL(`${stack.url}/projects/${PROJECT}`);
    const latest = page.getByRole('region', { name: /Latest on main/ });
    await latest.waitFor();
    expect(await latest.locator('[data-main-status]').getAttribute('data-main-status')).toBe('fail');
    expect(await latest.textContent()).toContain(statusLabel.fail);
    expect(await latest.textContent()).toContain(fourth.sha.slice(0, 7));
    expect(await latest.textContent()).toContain('1 open finding on main');

    // What fails on main, and since which build: the third, found from the history.
    const item = page.getByRole('region', { name: /Failing on main now/ }).locator('[data-failing-check="bench-level"]');
    await item.waitFor();
    expect(await item.locator('[data-since]').getAttribute('data-since')).toBe(third.sha);
    const text = (await item.textContent()) ?? '';
    expect(text).toContain('Bench level (level)');
    expect(text).toContain(`failing since ${third.sha.slice(0, 7)}`);
    expect(text).toContain('2 builds');
    // The margin in the one formatter: a dBFS check's margin is a difference in dB, with the real minus sign.
    expect(text).toMatch(/−\d+\.\d\d dB/);
    expect(text).not.toContain('dBFS');

    // Each branch's trend, main first, oldest mark left.
    const branches = page.getByRole('region', { name: 'Branches' });
    expect(await branches.locator('[data-branch]').evaluateAll((rows) => rows.map((r) => (r as HTMLElement).dataset.branch))).toEqual([MAIN_BRANCH, FEATURE]);
    const marks = (branch: string) => branches.locator(`[data-branch="${branch}"] [data-trend-mark]`).evaluateAll((m) => m.map((x) => (x as HTMLElement).dataset.trendMark));
    expect(await marks(MAIN_BRANCH)).toEqual(['pass', 'pass', 'fail', 'fail']);
    expect(await marks(FEATURE)).toEqual(['fail']);

    // The waiver request awaits this QA manager; the menu carries the API's counts.
    const awaiting = page.getByRole('region', { name: /Awaiting your decision/ });
    expect(await awaiting.locator('[data-awaiting="waiver"]').count()).toBe(1);
    expect(await awaiting.textContent()).toContain('engineer@example.test');
    await page.waitForLoadState('networkidle');
    expect(await navCount(page, 'Findings')).toBe(overview.counts.openFindingsOnMain);
    expect(await navCount(page, 'Approvals')).toBe(overview.counts.awaitingYou);
    await screenshot(page, 'overview');
    await noDocumentOverflow(page, 1280);
    await noDocumentOverflow(page, 390);
    await page.close();

    // An engineer decides nothing: no count on a menu item they do not have, and none awaiting.
    const asEngineer = await api<ProjectOverview>('GET', `/api/projects/${PROJECT}/overview`, await login('engineer@example.test'));
    expect(asEngineer.counts.awaitingYou).toBe(0);
  });

  it('lists findings by branch, main by default, with first sighting, occurrences and "since"; bulk actions fit at 1280 px', async () => {
    const engineer = await login('engineer@example.test');
    const onMain = await api<FindingsPage>('GET', `/api/projects/${PROJECT}/findings?state=active&branch=main`, engineer);
    expect(onMain.items.map((f) => [f.branch, f.firstSeen?.sha, f.occurrences, f.failingSince?.sha])).toEqual([[MAIN_BRANCH, third.sha, 2, third.sha]]);
    const page = await pageAs('engineer@example.test');
    await page.goto(`${stack.url}/projects/${PROJECT}/findings`);
    const table = page.getByRole('table', { name: 'Findings' });
    const rows = table.locator('tbody tr');
    await rows.first().waitFor();
    expect(await page.getByLabel('Branch').inputValue()).toBe(MAIN_BRANCH);
    const headers = await table.getByRole('columnheader').allTextContents();
    expect(headers.slice(1, 3)).toEqual(['Finding', 'State']);
    const col = (name: string) => headers.indexOf(name);
    expect(await rows.count()).toBe(1);
    const cell = async (name: string) => ((await rows.first().locator('td').nth(col(name)).textContent()) ?? '').trim();
    expect(await cell('Branch')).toBe(MAIN_BRANCH);
    expect(await cell('Finding')).toContain('Bench level (level)');
    const short = third.sha.slice(0, 7);
    expect(await cell('History')).toMatch(new RegExp(`^since ${short}\\s*2 builds, first\\s*${short}$`));
    expect(await rows.first().locator('[data-failing-since]').getAttribute('data-failing-since')).toBe(third.sha);
    expect(await cell('Margin')).toMatch(/^−\d+\.\d\d dB$/);
    await screenshot(page, 'findings-by-branch');

    // The feature branch has its own finding: one build, failing since that build.
    await page.getByLabel('Branch').selectOption(FEATURE);
    await page.waitForURL((url) => url.searchParams.get('branch') === FEATURE);
    await waitFor(async () => (await cell('Branch')) === FEATURE, { timeoutMs: 10_000, what: 'the feature branch findings' });
    expect(await rows.count()).toBe(1);
    expect(await rows.first().locator('[data-failing-since]').getAttribute('data-failing-since')).toBe(feature.sha);
    expect(await rows.first().locator('[data-occurrences]').getAttribute('data-occurrences')).toBe('1');
    await page.getByLabel('Branch').selectOption('*');
    await waitFor(async () => (await rows.count()) === 2, { timeoutMs: 10_000, what: 'findings of every branch' });

    // Bulk actions at 1280 px: the toolbar stays inside the page, the document does not overflow.
    await page.setViewportSize({ width: 1280, height: 900 });
    await table.getByRole('checkbox', { name: 'Select all findings on this page' }).check();
    const bar = page.getByRole('region', { name: 'Bulk actions' });
    await bar.waitFor();
    const box = (await bar.boundingBox())!;
    expect(box.x + box.width).toBeLessThanOrEqual(1280);
    expect(await bar.textContent()).toContain('2 selected');
    await noDocumentOverflow(page, 1280);
    // At 390 px the table scrolls in its own frame, with Finding and State in view.
    await noDocumentOverflow(page, 390);
    const state = (await table.getByRole('columnheader', { name: 'State' }).boundingBox())!;
    expect(state.x + state.width, 'State header within the phone screen').toBeLessThanOrEqual(390);
    await page.close();
  });

  it('fits the navigation and the builds table into 390 px', async () => {
    const page = await pageAs('qa_manager@example.test', 390, 844);
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
    const labels = (await links.allTextContents()).map((l) => l.replace(/\d+$/, ''));
    expect(labels).toEqual(['Projects', 'Overview', 'Builds', 'Findings', 'Test cases', 'Approvals', 'Audit log']);
    for (let i = 0; i < labels.length; i += 1) {
      const box = (await links.nth(i).boundingBox())!;
      expect(box.x >= 0 && box.x + box.width <= 390 && box.y + box.height <= 844, `${labels[i]} at x ${box.x}, width ${box.width}, y ${box.y}`).toBe(true);
    }
    await links.filter({ hasText: 'Builds' }).click();
    await page.getByRole('heading', { name: 'Builds' }).waitFor();
    expect(await menu.getAttribute('aria-expanded')).toBe('false');
    const table = page.getByRole('table', { name: 'Builds' });
    await table.locator('tbody tr').first().waitFor();
    const status = (await table.getByRole('columnheader', { name: /^Status/ }).boundingBox())!;
    expect(status.x + status.width, 'Status header within the phone screen').toBeLessThanOrEqual(390);
    expect((await table.locator('tbody tr').first().locator('td').nth(1).textContent())?.trim()).toBe('Fail');
    await noDocumentOverflow(page, 390);
    await page.setViewportSize({ width: 1440, height: 900 });
    await noDocumentOverflow(page, 1280);
    await page.close();
    expect(consoleErrors).toEqual([]);
  });
});
