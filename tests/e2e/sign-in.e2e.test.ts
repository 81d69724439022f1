import { DEMO_PASSWORD } from '@earmark/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { startDemoServer } from '../support/demo-server.js';

let server: Awaited<ReturnType<typeof startDemoServer>>;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
beforeAll(async () => {
  server = await startDemoServer();
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

/** A page with no stored session (the browser profile is shared between tests). */
async function signedOutPage() {
  const page = await browser.context.newPage();
  await page.goto(`${server.url}/`);
  await page.evaluate(() => localStorage.clear());
  await page.goto(`${server.url}/`);
  return page;
}

describe('signing in through the page', () => {
  it('shows the QA manager the projects list', async () => {
    const page = await signedOutPage();
    await page.getByLabel('Email').fill('qa@fernwick.test');
    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { name: 'Projects' }).waitFor();
    await expect(page.getByText('kestrel-buds').first().isVisible()).resolves.toBe(true);
    await expect(page.getByText('heron-bar').first().isVisible()).resolves.toBe(true);
    // The role shows in the app shell.
    await expect(page.getByText(/QA manager/i).first().isVisible()).resolves.toBe(true);
  });

  it('shows the problem detail for a wrong password and stays on the sign-in page', async () => {
    const page = await signedOutPage();
    await page.getByLabel('Email').fill('qa@fernwick.test');
    await page.getByLabel('Password').fill('not the password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByText('The e-mail or password is wrong.').waitFor();
    expect(await page.getByRole('heading', { name: 'Projects' }).count()).toBe(0);
  });

  it('serves unknown client routes with the app and a not-found page', async () => {
    const page = await browser.context.newPage();
    const res = await page.goto(`${server.url}/no/such/page`);
    expect(res?.status()).toBe(200);
    expect(await page.title()).toMatch(/Earmark/);
  });
});
