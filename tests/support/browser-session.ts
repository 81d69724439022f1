import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEMO_PASSWORD } from '@earmark/db';
import type { BrowserContext, Page } from 'playwright-core';

export const screenshotsDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../docs/screenshots');

/** Signs a demo user in through the page; console errors and page errors land in `errors`. */
export async function signedInPage(context: BrowserContext, baseUrl: string, email: string, errors: string[]): Promise<Page> {
  const page = await context.newPage();
  page.on('console', (msg) => {
    if (msg.type() === 'error') errors.push(`${email}: ${msg.text()}`);
  });
  page.on('pageerror', (error) => errors.push(`${email}: ${error.message}`));
  await page.goto(`${baseUrl}/`);
  await page.evaluate(() => localStorage.clear());
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('heading', { name: 'Projects' }).waitFor();
  return page;
}

export async function screenshot(page: Page, name: string): Promise<void> {
  await page.waitForLoadState('networkidle');
  await page.screenshot({ path: path.join(screenshotsDir, `${name}.png`) });
}
