import fs from 'node:fs';
import type { CaptureDto } from '@earmark/contracts';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser } from '../support/browser.js';
import { screenshot, screenshotsDir, signedInPage } from '../support/browser-session.js';
import { startDemoHistory } from '../support/demo-history.js';
import type { Stack } from '../support/stack.js';

/**
 * The mask workflow in a real browser against the running stack: a QA manager drafts a
 * revision in the editor with limits derived from golden captures, submits it, runs its
 * impact, is refused as its author; a second QA manager approves it and re-evaluates the
 * open builds, and the build shows the new verdict.
 */
let stack: Stack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
const errors: string[] = [];
const masksUrl = () => `${stack.url}/projects/kestrel-buds/test-cases/eq.music.sweep/masks`;

beforeAll(async () => {
  fs.mkdirSync(screenshotsDir, { recursive: true });
  stack = await startDemoHistory();
  browser = await launchBrowser();
}, 420_000); // the six-week demo history is seeded through the pipeline first

afterAll(async () => {
  await browser?.close();
  await stack?.close();
});

describe('mask workflow in the browser', () => {
  let author: Page;
  let revision = 0;

  it('drafts a revision in the editor, derives limits from golden captures and submits it', async () => {
    author = await signedInPage(browser.context, stack.url, 'qa@fernwick.test', errors);
    await author.goto(masksUrl());
    await author.getByRole('heading', { name: 'Masks — eq.music.sweep' }).waitFor();
    await author.getByRole('button', { name: 'Copy to new draft' }).click();
    // The copy opens as the newest revision, a draft.
    await author.getByRole('heading', { name: 'Revision 2' }).waitFor();
    await author.getByRole('table', { name: 'Checks editor' }).waitFor();
    revision = 2;
    expect(revision).toBeGreaterThan(1);
    await author.getByLabel('Note').fill('Response limits from the three passing nightlies (k = 3, 0.5 dB guard).');

    await author.getByRole('button', { name: 'Derive from captures' }).click();
    const wizard = author.getByRole('dialog');
    // Golden captures: the passing ones (the newest main builds carry the bass regression).
    const passing = wizard.getByRole('listitem').filter({ hasText: 'Pass' });
    expect(await passing.count()).toBeGreaterThanOrEqual(3);
    for (let i = 0; i < 3; i++) await passing.nth(i).getByRole('checkbox').check();
    await wizard.getByRole('button', { name: 'Preview limits' }).click();
    await wizard.getByRole('button', { name: 'Use as draft' }).waitFor({ state: 'visible' });
    await expect.poll(() => wizard.getByRole('button', { name: 'Use as draft' }).isEnabled(), { timeout: 20_000 }).toBe(true);
    // The wizard's screenshot (mask-derive) is taken by derive-wizard.e2e.test.ts.
    await wizard.getByRole('button', { name: 'Use as draft' }).click();
    await author.getByRole('figure', { name: 'Limit preview' }).waitFor();
    await author.getByRole('button', { name: 'Save draft' }).click();
    await expect.poll(() => author.getByText('Unsaved changes').count(), { timeout: 10_000 }).toBe(0);
    await author.getByRole('button', { name: 'Submit for review' }).click();
    await author.getByText(/in review/i).first().waitFor();
  });

  it('shows the impact and refuses the author’s own approval', async () => {
    expect(revision).toBeGreaterThan(1);
    await author.goto(`${stack.url}/projects/kestrel-buds/approvals`);
    await author.getByRole('heading', { name: 'Approvals' }).waitFor();
    const card = author.getByRole('article', { name: `Revision ${revision} of eq.music.sweep` }).first();
    await card.getByRole('button', { name: 'Run impact' }).click();
    await card.getByRole('table', { name: `Impact of revision ${revision} per build` }).waitFor({ timeout: 60_000 });
    // Derived from passing nightlies, the new envelope fails the builds whose bass crept further.
    // (The demo's own level.tone.997 revision waits in review beside this one.)
    const worstRow = card.getByRole('table', { name: `Worst margins of revision ${revision}` }).getByRole('row').filter({ hasText: 'response' }); // the derived envelope replaced `response`, keeping its id
    expect(await worstRow.textContent()).toMatch(/−\d|-\d/);
    expect(await card.getByRole('button', { name: 'Approve' }).isDisabled()).toBe(true);
    await card.getByText('You drafted this revision; another QA manager must approve it').waitFor();
  });

  it('is approved by another QA manager, who re-evaluates the open builds', async () => {
    expect(revision).toBeGreaterThan(1);
    const reviewer = await signedInPage(browser.context, stack.url, 'qa2@fernwick.test', errors);
    await reviewer.goto(`${stack.url}/projects/kestrel-buds/approvals`);
    const card = reviewer.getByRole('article', { name: `Revision ${revision} of eq.music.sweep` }).first();
    await card.getByRole('button', { name: 'Approve' }).click();
    // Approving asks first (tests/e2e/reviews-masks.e2e.test.ts checks what the confirmation says).
    await reviewer.getByRole('dialog').getByRole('button', { name: `Approve revision ${revision}` }).click();
    await expect.poll(() => reviewer.getByRole('article', { name: `Revision ${revision} of eq.music.sweep` }).count(), { timeout: 15_000 }).toBe(0);

    await reviewer.goto(`${masksUrl()}?rev=${revision}`);
    await reviewer.getByRole('button', { name: 'Re-evaluate open builds' }).click();
    await reviewer.getByText(/queued for a new verdict|already judged/).waitFor();

    // The newest main build's sweep capture gets a verdict under the new revision, linked to the old one.
    const build = (await (await fetch(`${stack.url}/api/v1/projects/kestrel-buds/builds/d19b3f8e44`, { headers: { authorization: `Bearer ${stack.ciToken}` } })).json()) as { captures: CaptureDto[] };
    const sweep = build.captures.find((c) => c.testCase === 'eq.music.sweep')!;
    let judged: CaptureDto | null = null;
    for (const deadline = Date.now() + 45_000; !judged; ) {
      const c = (await (await fetch(`${stack.url}/api/v1/captures/${sweep.id}`, { headers: { authorization: `Bearer ${stack.ciToken}` } })).json()) as CaptureDto;
      if (c.verdict?.maskRevision === revision) judged = c;
      else if (Date.now() > deadline) throw new Error('the capture was not re-evaluated');
      else await new Promise((r) => setTimeout(r, 300));
    }
    expect(judged.verdict!.previousOutcome).toBe('fail');
    await reviewer.goto(`${stack.url}/projects/kestrel-buds/builds/d19b3f8e44/captures/${sweep.id}`);
    await reviewer.getByText(new RegExp(`mask rev ${revision}`)).first().waitFor();
    await reviewer.getByText(/re-evaluated; it was fail before/).first().waitFor();
    await reviewer.goto(`${stack.url}/projects/kestrel-buds/audit`);
    await reviewer.getByRole('heading', { name: 'Audit log' }).waitFor();
    await reviewer.getByText('mask.approve').first().waitFor();
    await screenshot(reviewer, 'audit');
    await reviewer.goto(`${stack.url}/projects/kestrel-buds/test-cases`);
    await reviewer.getByRole('heading', { name: 'Test cases' }).waitFor();
    await screenshot(reviewer, 'test-cases');
  });

  it('wrote no console errors in any page', () => {
    expect(errors).toEqual([]);
  });
});
