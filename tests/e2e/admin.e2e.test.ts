import fs from 'node:fs';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { screenshot, screenshotsDir, signedInPage } from '../support/browser-session.js';
import { startStack, type Stack } from '../support/stack.js';
import { waitFor } from '../support/wait-for.js';

/**
 * The admin area in a real browser: a person invited by mail (through the worker and the SMTP
 * fake) chooses a password and signs in, is added to a project, is disabled; a project is created
 * and archived; the workspace audit log names all of it with links. Writes admin-users.png,
 * members.png and admin-audit.png, and fails on console errors or a page wider than the window.
 */
let stack: Stack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
const consoleErrors: string[] = [];
const INVITEE = { email: 'runa.velde@fernwick.test', name: 'Runa Velde', password: 'heron-lake-7741' };

beforeAll(async () => {
  fs.mkdirSync(screenshotsDir, { recursive: true });
  stack = await startStack({ seed: 'demo' });
  await stack.startWorker();
  browser = await launchBrowser();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

async function adminPage(width = 1440): Promise<Page> {
  const page = await signedInPage(browser.context, stack.url, 'admin@fernwick.test', consoleErrors);
  await page.setViewportSize({ width, height: 900 });
  return page;
}

/** Signs in through the page; `track` false when the sign-in is meant to fail (its 401 is not a page error). */
async function signInAs(email: string, password: string, track: boolean): Promise<Page> {
  const page = await browser.context.newPage();
  if (track) page.on('console', (msg) => msg.type() === 'error' && consoleErrors.push(`${email}: ${msg.text()}`));
  await page.goto(`${stack.url}/`);
  await page.evaluate(() => localStorage.clear());
  await page.goto(`${stack.url}/sign-in`);
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  return page;
}

/** The document never scrolls sideways; wide tables scroll inside their own frame. */
async function expectNoDocumentOverflow(page: Page): Promise<void> {
  for (const width of [1280, 390]) {
    await page.setViewportSize({ width, height: 900 });
    await page.waitForTimeout(50);
    // On failure the message names the elements that stick out.
    const wide = await page.evaluate(() =>
      document.documentElement.scrollWidth <= window.innerWidth
        ? []
        : Array.from(document.querySelectorAll('body *'))
            .filter((e) => e.getBoundingClientRect().right > window.innerWidth + 1 && !e.closest('.overflow-x-auto'))
            .slice(0, 6)
            .map((e) => `${e.tagName.toLowerCase()}.${String(e.className).slice(0, 60)} → ${Math.round(e.getBoundingClientRect().right)} px`),
    );
    expect(wide, `overflow at ${width} px on ${page.url()}`).toEqual([]);
  }
  await page.setViewportSize({ width: 1440, height: 900 });
}

type Mail = { to: { address: string }[]; subject: string; text: string };
async function mailTo(address: string, subject: string): Promise<Mail> {
  return waitFor(
    async () => {
      const inbox = (await (await fetch(`${stack.smtp.inboxUrl}api/email`)).json()) as Mail[];
      return inbox.find((m) => m.subject === subject && m.to.some((t) => t.address === address)) ?? null;
    },
    { what: `the mail "${subject}" to ${address}`, timeoutMs: 20_000, intervalMs: 200 },
  );
}

const rowOf = (page: Page, text: string) => page.getByRole('row').filter({ hasText: text });

describe('admin area', () => {
  it('invites a person by mail; the link sets their password and they sign in', async () => {
    const page = await adminPage();
    // The user menu leads to the admin area, which opens on Users; /users is no dead end either.
    await page.getByRole('button', { name: /Ilse Brandvold/ }).click();
    await page.getByRole('menuitem', { name: 'Admin' }).click();
    await page.waitForURL(`${stack.url}/admin/users`);
    await page.getByRole('heading', { name: 'Administration' }).waitFor();
    expect(await page.getByRole('navigation', { name: 'Administration' }).getByRole('link').allInnerTexts()).toEqual(['Users', 'Projects', 'Audit log']);
    await page.goto(`${stack.url}/users`);
    await page.waitForURL(`${stack.url}/admin/users`);

    await page.getByRole('button', { name: 'Invite person' }).click();
    const dialog = page.getByRole('dialog', { name: 'Invite a person' });
    await dialog.getByRole('button', { name: 'Send invitation' }).click();
    await dialog.getByText('Enter the e-mail address the invitation goes to.').waitFor();
    await dialog.getByLabel('E-mail').fill(INVITEE.email);
    await dialog.getByLabel('Name').fill(INVITEE.name);
    await dialog.getByRole('button', { name: 'Send invitation' }).click();
    await page.getByText(`Invitation sent to ${INVITEE.email}`).waitFor();
    const row = rowOf(page, INVITEE.email);
    await row.getByText('Invited').waitFor();
    expect(await row.getByRole('cell').nth(3).innerText()).toBe('Never');
    await expectNoDocumentOverflow(page);
    await screenshot(page, 'admin-users');

    const mail = await mailTo(INVITEE.email, '[Earmark] You are invited to Earmark');
    expect(mail.text).toContain('Ilse Brandvold (admin@fernwick.test) invited you, Runa Velde, to Earmark');
    expect(mail.text).toContain('The link works once and for 72 hours');
    const secret = /\/set-password\/([A-Za-z0-9_-]{43})/.exec(mail.text)?.[1];
    expect(secret).toBeDefined();

    const invitee = await browser.context.newPage();
    invitee.on('console', (msg) => msg.type() === 'error' && consoleErrors.push(`invitee: ${msg.text()}`));
    await invitee.setViewportSize({ width: 390, height: 900 });
    await invitee.goto(`${stack.url}/set-password/${secret}`);
    await invitee.getByRole('heading', { name: 'Welcome, Runa Velde' }).waitFor();
    expect(await invitee.getByText(INVITEE.email).first().isVisible()).toBe(true);
    await invitee.getByLabel('New password').fill('short');
    await invitee.getByRole('button', { name: 'Set password' }).click();
    await invitee.getByText('The password needs at least 10 characters.').waitFor();
    await invitee.getByLabel('New password').fill(INVITEE.password);
    await invitee.getByLabel('Repeat the password').fill(INVITEE.password);
    await invitee.getByRole('button', { name: 'Set password' }).click();
    await invitee.getByRole('heading', { name: 'Your password is set' }).waitFor();
    expect(await invitee.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
    await invitee.close();

    const signedIn = await signInAs(INVITEE.email, INVITEE.password, true);
    await signedIn.getByRole('heading', { name: 'Projects', exact: true }).waitFor();
    // Not a member of anything yet.
    await signedIn.getByText('No projects yet').waitFor();
    expect(await signedIn.getByText('kestrel-buds').count()).toBe(0);
    await signedIn.close();
    await page.close();
    // The browser's one session is the invitee's now; the administrator signs in again.
    const again = await adminPage();
    await again.goto(`${stack.url}/admin/users`);
    await rowOf(again, INVITEE.email).getByText('Active').waitFor();
    await again.close();
  }, 120_000);

  it('adds the person to a project with a role, which they then see', async () => {
    const page = await adminPage();
    await page.goto(`${stack.url}/projects/kestrel-buds/members`);
    await page.getByRole('heading', { name: 'Members' }).waitFor();
    const form = page.getByRole('form', { name: 'Add a member' });
    await form.getByLabel('Person').selectOption(INVITEE.email);
    await form.getByLabel('Role').selectOption('engineer');
    await form.getByRole('button', { name: 'Add member' }).click();
    await page.getByText('Runa Velde added to kestrel-buds as Engineer').waitFor();
    const row = rowOf(page, INVITEE.email);
    expect(await row.getByLabel('Role of Runa Velde').inputValue()).toBe('engineer');
    await expectNoDocumentOverflow(page);
    await screenshot(page, 'members');

    const member = await signInAs(INVITEE.email, INVITEE.password, true);
    await member.getByRole('heading', { name: 'Projects', exact: true }).waitFor();
    await member.getByText('kestrel-buds').first().waitFor();
    expect(await member.getByText('Engineer').first().isVisible()).toBe(true);
    await member.close();
    await page.close();
  }, 120_000);

  it('disables the person after a confirmation; they can no longer sign in', async () => {
    const page = await adminPage();
    await page.goto(`${stack.url}/admin/users`);
    await rowOf(page, INVITEE.email).getByRole('button', { name: 'Disable' }).click();
    const dialog = page.getByRole('dialog', { name: 'Disable Runa Velde?' });
    expect(await dialog.innerText()).toContain(`${INVITEE.email} is signed out everywhere at once`);
    await dialog.getByRole('button', { name: 'Disable' }).click();
    await page.getByText('Runa Velde is disabled').waitFor();
    await rowOf(page, INVITEE.email).getByText('Disabled').waitFor();
    // The administrator's own row cannot be disabled.
    expect(await rowOf(page, 'admin@fernwick.test').getByRole('button', { name: 'Disable' }).isDisabled()).toBe(true);

    // Its 401 is the expected answer, not a page error, so this page is not tracked.
    const refused = await signInAs(INVITEE.email, INVITEE.password, false);
    await refused.getByText('The e-mail or password is wrong.').waitFor();
    await refused.close();
    await page.close();
  }, 120_000);

  it('creates a project and archives it after a confirmation; it leaves the projects list', async () => {
    const page = await adminPage();
    await page.goto(`${stack.url}/admin/projects`);
    await page.getByRole('button', { name: 'Create project' }).click();
    const dialog = page.getByRole('dialog', { name: 'Create a project' });
    await dialog.getByLabel('Key').fill('Wren Speaker');
    await dialog.getByLabel('Name').fill('Wren Speaker');
    await dialog.getByRole('button', { name: 'Create project' }).click();
    await dialog.getByText(/lower-case letters, digits and dashes/).waitFor();
    await dialog.getByLabel('Key').fill('wren-speaker');
    await dialog.getByRole('button', { name: 'Create project' }).click();
    await page.getByText('Project wren-speaker created').waitFor();
    await page.waitForURL(`${stack.url}/projects/wren-speaker/members`);

    await page.goto(`${stack.url}/admin/projects`);
    await rowOf(page, 'wren-speaker').getByRole('button', { name: 'Archive' }).click();
    const confirm = page.getByRole('dialog', { name: 'Archive Wren Speaker?' });
    await confirm.getByRole('button', { name: 'Archive' }).click();
    await page.getByText('Wren Speaker is archived').waitFor();
    await rowOf(page, 'wren-speaker').getByText('Archived').waitFor();
    await page.goto(`${stack.url}/projects`);
    await page.getByRole('heading', { name: 'Projects' }).waitFor();
    await page.getByText('kestrel-buds').first().waitFor();
    expect(await page.getByText('wren-speaker').count()).toBe(0);
    await expectNoDocumentOverflow(page);
    await page.close();
  }, 120_000);

  it('shows the audit log with names and links, filtered by action and project', async () => {
    const page = await adminPage();
    await page.goto(`${stack.url}/admin`);
    await page.waitForURL(`${stack.url}/admin/users`);
    await page.getByRole('navigation', { name: 'Administration' }).getByRole('link', { name: 'Audit log' }).click();
    await page.getByRole('table', { name: 'Workspace audit log' }).waitFor();

    await page.getByLabel('Action').fill('user.');
    await page.getByRole('button', { name: 'Apply' }).click();
    await page.waitForURL(/action=user\./);
    const table = page.getByRole('table', { name: 'Workspace audit log' });
    await table.getByRole('cell', { name: 'user.disable' }).waitFor();
    const actions = await table.locator('tbody tr td:nth-child(3)').allInnerTexts();
    expect(actions.every((a) => a.startsWith('user.'))).toBe(true);
    expect(actions).toEqual(expect.arrayContaining(['user.invite', 'user.accept-invite', 'user.disable']));

    const invite = table.getByRole('row').filter({ has: page.getByRole('cell', { name: 'user.invite', exact: true }) });
    expect(await invite.getByRole('link', { name: 'Ilse Brandvold' }).getAttribute('href')).toBe('/admin/users?user=admin%40fernwick.test');
    expect(await invite.getByRole('link', { name: 'Runa Velde' }).getAttribute('href')).toBe('/admin/users?user=runa.velde%40fernwick.test');
    expect(await invite.getByText('Workspace').isVisible()).toBe(true);
    expect(await table.innerText()).not.toMatch(/[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}/);

    await page.getByLabel('Action').fill('');
    await page.getByRole('button', { name: 'Apply' }).click();
    await page.getByLabel('Project').selectOption('kestrel-buds');
    await page.waitForURL(/project=kestrel-buds/);
    const membership = table.getByRole('row').filter({ has: page.getByRole('cell', { name: 'membership.set', exact: true }) }).filter({ hasText: 'Runa Velde' });
    await membership.waitFor();
    expect(await membership.getByRole('link', { name: 'Kestrel Buds' }).getAttribute('href')).toBe('/projects/kestrel-buds');

    // A link from the log marks the person's row on the Users tab (once the filtered page has settled).
    await page.waitForLoadState('networkidle');
    const personLink = membership.getByRole('link', { name: 'Runa Velde' });
    expect(await personLink.getAttribute('href')).toBe('/admin/users?user=runa.velde%40fernwick.test');
    await personLink.click();
    await page.waitForURL(/\/admin\/users\?user=runa/);
    expect(await page.locator('tr[aria-current="true"]').innerText()).toContain(INVITEE.email);
    await page.goto(`${stack.url}/admin/audit`);
    await page.getByRole('table', { name: 'Workspace audit log' }).waitFor();
    await screenshot(page, 'admin-audit');
    await expectNoDocumentOverflow(page);
    await page.close();
  }, 120_000);

  it('left no console errors', () => {
    expect(consoleErrors).toEqual([]);
  });
});
