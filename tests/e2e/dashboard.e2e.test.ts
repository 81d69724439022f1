import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import { StimulusSpec } from '@earmark/contracts';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { screenshot, screenshotsDir, signedInPage } from '../support/browser-session.js';
import { startDemoHistory } from '../support/demo-history.js';
import type { Stack } from '../support/stack.js';

/**
 * The dashboard in a real browser against the running stack (API, worker, PostgreSQL,
 * S3 and SMTP fakes) with the demo history sent through the pipeline. Writes screenshots
 * of the main screens to docs/screenshots/ and fails on any console error.
 */
const here = path.dirname(fileURLToPath(import.meta.url));
const cli = path.resolve(here, '../../apps/cli/bin/earmark.mjs');
let stack: Stack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
const consoleErrors: string[] = [];

const pageAs = (email: string): Promise<Page> => signedInPage(browser.context, stack.url, email, consoleErrors);
const shot = screenshot;

function runCli(args: string[], env: Record<string, string>): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [cli, ...args], { env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    child.stdout.on('data', (c: Buffer) => (out += c.toString()));
    child.stderr.on('data', (c: Buffer) => (out += c.toString()));
    child.once('exit', (code) => resolve({ code, out }));
  });
}

beforeAll(async () => {
  fs.mkdirSync(screenshotsDir, { recursive: true });
  stack = await startDemoHistory();
  browser = await launchBrowser();
}, 420_000); // the six-week demo history is seeded through the pipeline first

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

describe('dashboard in the browser', () => {
  it('signs in as each role and shows only what the role allows', async () => {
    for (const [email, role] of [['admin@fernwick.test', 'admin'], ['qa@fernwick.test', 'qa'], ['engineer@fernwick.test', 'engineer'], ['viewer@fernwick.test', 'viewer']] as const) {
      const page = await pageAs(email);
      await page.goto(`${stack.url}/projects/kestrel-buds/builds`);
      await page.getByRole('heading', { name: 'Builds' }).waitFor();
      const tokensNav = await page.getByRole('link', { name: 'API tokens' }).count();
      expect(tokensNav > 0, `${role} sees the API tokens entry`).toBe(role === 'admin');
      await page.goto(`${stack.url}/projects/kestrel-buds/findings`);
      await page.getByRole('heading', { name: 'Findings' }).waitFor();
      await page.getByRole('table').first().waitFor();
      const assign = await page.getByRole('button', { name: 'Assign' }).count();
      if (role === 'viewer') expect(assign).toBe(0);
      else expect(assign).toBeGreaterThan(0);
      if (role === 'engineer') await shot(page, 'findings');
      await page.close();
    }
  });

  it('opens a failing build and its failing capture: spectrum over the mask, the failing check and its margin', async () => {
    const page = await pageAs('engineer@fernwick.test');
    await shot(page, 'projects');
    await page.goto(`${stack.url}/projects/kestrel-buds/builds`);
    await page.getByRole('heading', { name: 'Builds' }).waitFor();
    await page.getByText('nightly 411').waitFor();
    await shot(page, 'builds');
    await page.getByText('nightly 411').click();
    await page.getByRole('heading', { name: /^Build d19b3f8/ }).waitFor();
    const matrix = page.getByRole('table', { name: 'Build matrix' });
    await matrix.waitFor();
    // build.png and capture.png are written by capture-page.e2e.test.ts.
    await matrix.locator('[data-testcase="eq.music.sweep"][data-target="evt2-48k"] a').first().click();
    await page.getByRole('heading', { name: 'Music EQ preset, exponential sweep' }).waitFor();
    await page.getByRole('region', { name: 'Transfer magnitude' }).locator('canvas').first().waitFor();
    const worst = page.getByTestId('worst-point-label');
    await worst.waitFor();
    // The demo's newest nightly: the adaptive bass EQ has crept out of the envelope near 70 Hz.
    expect(await worst.textContent()).toMatch(/^−0\.\d\d dB margin at [67]\d(\.\d)? Hz$/);
    const checks = page.getByRole('table', { name: 'Checks' });
    const responseRow = checks.getByRole('row').filter({ hasText: 'response' }).first();
    expect(await responseRow.textContent()).toMatch(/−0\.\d\d/);
    await page.close();
  });

  it("shows each build's status in the builds table as the API reports it", async () => {
    const res = await fetch(`${stack.url}/api/v1/projects/kestrel-buds/builds?pageSize=50`, { headers: { authorization: `Bearer ${stack.ciToken}` } });
    const api = ((await res.json()) as { items: { sha: string; status: string }[] }).items;
    expect(api.map((b) => b.status)).toContain('error');
    const label: Record<string, string> = { pass: 'Pass', fail: 'Fail', error: 'Error', pending: 'Pending', running: 'Running' };
    const page = await pageAs('viewer@fernwick.test');
    await page.goto(`${stack.url}/projects/kestrel-buds/builds`);
    const table = page.getByRole('table', { name: 'Builds' });
    await table.locator(`tr[data-sha="${api[0]!.sha}"]`).waitFor();
    const headers = await table.getByRole('columnheader').allTextContents();
    const column = headers.findIndex((h) => h.startsWith('Status'));
    expect(column).toBeGreaterThanOrEqual(0);
    // Every row of the table's first page (the demo history is longer than one page).
    const rows = table.locator('tr[data-sha]');
    const count = await rows.count();
    expect(count).toBeGreaterThanOrEqual(Math.min(api.length, 20));
    const shown: Record<string, string> = {};
    for (let i = 0; i < count; i++) shown[(await rows.nth(i).getAttribute('data-sha'))!] = ((await rows.nth(i).locator('td').nth(column).textContent()) ?? '').trim();
    const statusOf = new Map(api.map((b) => [b.sha, b.status]));
    expect(shown).toEqual(Object.fromEntries(Object.keys(shown).map((sha) => [sha, label[statusOf.get(sha) ?? 'missing from the API']])));
    await page.close();
  });

  it('assigns and comments on a finding from the capture page', async () => {
    const page = await pageAs('engineer@fernwick.test');
    await page.goto(`${stack.url}/projects/kestrel-buds/builds/d19b3f8e44`);
    await page.getByRole('table', { name: 'Build matrix' }).locator('[data-testcase="eq.music.sweep"][data-target="evt2-48k"] a').first().click();
    await page.getByRole('region', { name: 'Transfer magnitude' }).locator('canvas').first().waitFor();
    await page.waitForLoadState('networkidle');
    const triage = page.getByRole('region', { name: 'Findings' });
    await triage.getByRole('button', { name: 'Assign' }).first().click();
    await page.getByRole('menuitemradio', { name: /\(me\)/ }).click();
    await triage.getByText('Maren Ostrowe').first().waitFor();
    await triage.getByRole('button', { name: /Comments/ }).first().click();
    await page.getByLabel('Comment', { exact: true }).fill('The bass boost has crept up since nightly 404; capping the adaptive EQ in 412.');
    await page.getByRole('button', { name: 'Add comment' }).click();
    await page.getByRole('list', { name: 'Comments' }).getByText('capping the adaptive EQ in 412').waitFor();
    await page.close();
  });

  it('creates an API token, submits a capture with it, sees the build, revokes it and sees the CLI refused', async () => {
    const page = await pageAs('admin@fernwick.test');
    await page.goto(`${stack.url}/projects/kestrel-buds/tokens`);
    await page.getByRole('heading', { name: 'API tokens' }).waitFor();
    await page.getByRole('button', { name: 'Create token' }).first().click();
    await page.getByLabel('Name').fill('bench-rig-7');
    await page.getByRole('dialog').getByRole('button', { name: 'Create token' }).click();
    const secret = (await page.getByTestId('token-secret').textContent())!.trim();
    expect(secret).toMatch(/^em_[a-z0-9]{10}_/);
    await shot(page, 'tokens');

    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-e2e-'));
    const file = path.join(dir, 'tone.wav');
    const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: 48000, seconds: 2, levelDbfs: -20, frequency: 997 });
    fs.writeFileSync(file, encodeWav(stimulusAsPlayed(spec).channels, 48000, { bitsPerSample: 24 }));
    const env = { EARMARK_URL: stack.url, EARMARK_TOKEN: secret };
    const args = ['submit', '--project', 'kestrel-buds', '--case', 'level.tone.997', '--target', 'evt2-48k', file, '--wait', '--timeout', '60'];
    const ok = await runCli([...args, '--sha', 'abc0e2e001', '--label', 'from the e2e rig'], env);
    expect(ok.code, ok.out).toBe(0);

    await page.goto(`${stack.url}/projects/kestrel-buds/builds`);
    await page.getByText('from the e2e rig').waitFor();

    await page.goto(`${stack.url}/projects/kestrel-buds/tokens`);
    const row = page.getByRole('table', { name: 'API tokens' }).getByRole('row').filter({ hasText: 'bench-rig-7' });
    await row.getByRole('button', { name: 'Revoke' }).click();
    await page.getByRole('dialog').getByRole('button', { name: 'Revoke' }).click();
    await row.getByText(/Revoked/).waitFor();
    const refused = await runCli([...args, '--sha', 'abc0e2e002'], env);
    expect(refused.code).toBe(3); // a problem answer from the server: could not finish, not a verdict
    expect(refused.out).toMatch(/revoked/i);
    await page.close();
  });

  it('wrote no console errors in any page', () => {
    expect(consoleErrors).toEqual([]);
  });
});
