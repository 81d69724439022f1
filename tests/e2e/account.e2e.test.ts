import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { ApiToken, DEMO_PASSWORD } from '@earmark/db';
import { encodeWav } from '@earmark/dsp';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { screenshot, screenshotsDir, signedInPage } from '../support/browser-session.js';
import { startStack, type Stack } from '../support/stack.js';

/**
 * Every user's own account in a real browser: the password change (and what it does to other
 * sessions), build-failure mail per project read back after a reload, and CI tokens that
 * expire, down to the words an expired token gets from the API and the CLI.
 */
const cli = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../apps/cli/bin/earmark.mjs');
let stack: Stack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
const consoleErrors: string[] = [];

beforeAll(async () => {
  fs.mkdirSync(screenshotsDir, { recursive: true });
  stack = await startStack({ seed: 'demo' });
  browser = await launchBrowser();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

async function api(method: string, route: string, opts: { token?: string; body?: unknown } = {}): Promise<{ status: number; body: any }> {
  const res = await fetch(`${stack.url}${route}`, {
    method,
    headers: { ...(opts.token ? { authorization: `Bearer ${opts.token}` } : {}), ...(opts.body === undefined ? {} : { 'content-type': 'application/json' }) },
    body: opts.body === undefined ? undefined : JSON.stringify(opts.body),
  });
  const text = await res.text();
  return { status: res.status, body: text ? JSON.parse(text) : null };
}

const signIn = (email: string, password: string) => api('POST', '/api/auth/login', { body: { email, password } });

async function pageAt(email: string, width: number): Promise<Page> {
  const page = await signedInPage(browser.context, stack.url, email, consoleErrors);
  await page.setViewportSize({ width, height: 900 });
  return page;
}

/** The document never scrolls sideways; wide tables scroll inside their own frame. */
async function expectNoDocumentOverflow(page: Page, back: number): Promise<void> {
  for (const width of [1280, 390]) {
    await page.setViewportSize({ width, height: 900 });
    expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth), `overflow at ${width} px on ${page.url()}`).toBe(true);
  }
  await page.setViewportSize({ width: back, height: 900 });
}

function runCli(args: string[], env: Record<string, string>): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [cli, ...args], { env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    child.stdout.on('data', (c: Buffer) => (out += c.toString()));
    child.stderr.on('data', (c: Buffer) => (out += c.toString()));
    child.once('exit', (code) => resolve({ code, out }));
  });
}

describe('account page', () => {
  it('changes the password from the user menu: the new one signs in, the old one and other sessions are refused', async () => {
    const email = 'viewer@fernwick.test';
    const newPassword = 'heron-bar-nightly-41';
    const other = (await signIn(email, DEMO_PASSWORD)).body; // a session on "another device"
    const me = (await api('GET', '/api/me', { token: other.accessToken })).body;

    const page = await pageAt(email, 1440);
    await page.getByRole('button', { name: new RegExp(me.displayName) }).click();
    await page.getByRole('menuitem', { name: 'Account' }).click();
    await page.getByRole('heading', { level: 1, name: me.displayName }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/account');
    await expectNoDocumentOverflow(page, 1440);

    const form = page.getByRole('form', { name: 'Change password' });
    await form.getByLabel('Current password', { exact: true }).fill(DEMO_PASSWORD);
    await form.getByLabel('New password', { exact: true }).fill(newPassword);
    await form.getByLabel('Repeat the new password').fill(newPassword);
    await form.getByRole('button', { name: 'Change password' }).click();
    await page.getByText('Password changed').waitFor();
    expect(await form.getByLabel('Current password', { exact: true }).inputValue()).toBe('');

    // This tab carries on with its fresh session; the other device's session is over.
    await page.reload();
    await page.getByRole('heading', { level: 1, name: me.displayName }).waitFor();
    expect((await api('GET', '/api/me', { token: other.accessToken })).status).toBe(401);
    expect((await api('POST', '/api/auth/refresh', { body: { refreshToken: other.refreshToken } })).status).toBe(401);

    const old = await signIn(email, DEMO_PASSWORD);
    expect(old.status).toBe(401);
    expect(old.body.detail).toBe('The e-mail or password is wrong.');

    // The new password signs in through the page.
    const fresh = await browser.context.newPage();
    fresh.on('console', (msg) => (msg.type() === 'error' ? consoleErrors.push(`fresh: ${msg.text()}`) : undefined));
    await fresh.goto(`${stack.url}/`);
    await fresh.evaluate(() => localStorage.clear());
    await fresh.goto(`${stack.url}/sign-in`);
    await fresh.getByLabel('Email').fill(email);
    await fresh.getByLabel('Password').fill(newPassword);
    await fresh.getByRole('button', { name: 'Sign in' }).click();
    await fresh.getByRole('heading', { name: 'Projects' }).waitFor();
    await fresh.close();
    await page.close();
  });

  it('switches build-failure mail for one project and reads it back after a reload, at 390 px', async () => {
    const email = 'qa@fernwick.test';
    const token = (await signIn(email, DEMO_PASSWORD)).body.accessToken as string;
    const before = (await api('GET', '/api/projects/kestrel-buds/subscription', { token })).body.buildFailures as boolean;

    const page = await pageAt(email, 390);
    await page.goto(`${stack.url}/account`);
    const list = page.getByRole('list', { name: 'Build-failure mail per project' });
    const row = list.locator('li[data-project="kestrel-buds"]');
    const toggle = row.getByRole('switch');
    await expect.poll(() => toggle.getAttribute('aria-checked')).toBe(String(before));
    expect(await row.textContent()).toContain('kestrel-buds');
    await expectNoDocumentOverflow(page, 390);

    await toggle.click();
    await page.getByText(`Build-failure mail ${before ? 'off' : 'on'} for`).first().waitFor();
    await page.reload();
    await expect.poll(() => page.getByRole('list', { name: 'Build-failure mail per project' }).locator('li[data-project="kestrel-buds"]').getByRole('switch').getAttribute('aria-checked')).toBe(String(!before));
    expect((await api('GET', '/api/projects/kestrel-buds/subscription', { token })).body).toEqual({ buildFailures: !before });

    await page.setViewportSize({ width: 1440, height: 900 });
    await page.mouse.move(0, 0);
    await screenshot(page, 'account');
    await page.close();
  });

  it('creates a token that expires, lists when, and an expired token gets words saying so from the API and the CLI', async () => {
    const page = await pageAt('admin@fernwick.test', 1440);
    await page.goto(`${stack.url}/projects/kestrel-buds/tokens`);
    await page.getByRole('heading', { name: 'API tokens' }).waitFor();
    await page.getByRole('button', { name: 'Create token' }).first().click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Name').fill('rig-with-expiry');
    await dialog.getByLabel('Expires').selectOption({ label: 'In 30 days' });
    await dialog.getByRole('button', { name: 'Create token' }).click();
    const secret = (await page.getByTestId('token-secret').textContent())!.trim();
    await dialog.getByRole('button', { name: 'Done' }).click();

    const row = page.getByRole('table', { name: 'API tokens' }).getByRole('row').filter({ hasText: 'rig-with-expiry' });
    await row.getByText('expires in 30 days').waitFor();
    expect(await row.getByRole('button', { name: 'Revoke' }).count()).toBe(1);
    expect((await api('GET', '/api/v1/projects/kestrel-buds/builds', { token: secret })).status).toBe(200);
    await expectNoDocumentOverflow(page, 1440);

    // Time passes: the test moves the expiry into the past in the database.
    await stack.orm.em.fork().nativeUpdate(ApiToken, { prefix: secret.split('_')[1]! }, { expiresAt: new Date('2026-11-02T08:30:00Z') });
    const refused = await api('GET', '/api/v1/projects/kestrel-buds/builds', { token: secret });
    expect(refused.status).toBe(401);
    expect(refused.body).toMatchObject({
      status: 401,
      code: 'token-expired',
      detail: "This API token expired on 2026-11-02 08:30 UTC; a project admin can create a new one on the project's API tokens page.",
    });

    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-account-e2e-'));
    const file = path.join(dir, 'tone.wav');
    fs.writeFileSync(file, encodeWav([Float64Array.from({ length: 4800 }, (_, i) => 0.1 * Math.sin((2 * Math.PI * 997 * i) / 48_000))], 48_000, { bitsPerSample: 24 }));
    const cliRun = await runCli(['submit', '--project', 'kestrel-buds', '--sha', 'acc0e2e001', '--case', 'level.tone.997', '--target', 'evt2-48k', file], { EARMARK_URL: stack.url, EARMARK_TOKEN: secret });
    fs.rmSync(dir, { recursive: true, force: true });
    expect(cliRun.code).toBe(3);
    expect(cliRun.out).toContain('This API token expired on 2026-11-02 08:30 UTC');

    await page.reload();
    const expiredRow = page.getByRole('table', { name: 'API tokens' }).getByRole('row').filter({ hasText: 'rig-with-expiry' });
    await expiredRow.getByText(/^· expired \d+ days ago$/).waitFor();
    expect(await expiredRow.textContent()).toMatch(/Expired· expired \d+ days ago/);
    expect(await expiredRow.getByRole('button', { name: 'Revoke' }).count()).toBe(0);
    await page.close();
  });

  it('wrote no console errors in any page', () => {
    expect(consoleErrors).toEqual([]);
  });
});
