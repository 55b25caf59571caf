import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, newSignedOutPage, screenshot, watchForPageErrors } from './browser.js';

// Two seeded demo accounts (server/seed/demo-workspace.ts) edit the same seeded draft SIF.
const DEMO_PROJECT = 'Brackwater Point Gas Terminal: export compression';
// XZS-1601 is a draft that no other browser test changes.
const SIF_TAG = 'XZS-1601';

describe('two people saving one SIF in browsers', () => {
  let browser: Browser;
  const contexts: BrowserContext[] = [];
  const pageErrors: string[][] = [];

  beforeAll(async () => {
    browser = await launchChromium();
  });

  afterAll(async () => {
    for (const context of contexts) await context.close();
    await browser?.close();
  });

  async function openSifAs(username: string): Promise<Page> {
    const { context, page } = await newSignedOutPage(browser);
    contexts.push(context);
    pageErrors.push(watchForPageErrors(page, [409]));
    await page.goto(`${inject('baseUrl')}/sign-in`);
    await page.getByLabel('Username').fill(username);
    await page.getByLabel('Password').fill(`proofline-${username}`);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByText(DEMO_PROJECT, { exact: true }).click();
    await page.getByRole('link', { name: SIF_TAG, exact: true }).click();
    await page.getByRole('heading', { name: SIF_TAG }).waitFor();
    return page;
  }

  it('shows the later saver both versions, keeps the edits, and overwrites only when asked', async () => {
    const engineer = await openSifAs('engineer');
    const lead = await openSifAs('lead');

    await lead.getByLabel('Title').fill('Loading arm LA-160 release interlock (renamed by the lead)');
    await lead.getByRole('button', { name: 'Save changes' }).click();
    await lead.getByText(`${SIF_TAG} saved (version 2)`).waitFor();

    const myTitle = 'Loading arm LA-160 emergency release and valve closure interlock';
    await engineer.getByLabel('Title').fill(myTitle);
    await engineer.getByRole('button', { name: 'Save changes' }).click();
    const dialog = engineer.getByRole('dialog');
    await dialog.getByRole('heading', { name: 'Someone else saved this SIF' }).waitFor();
    expect(await dialog.textContent()).toContain('renamed by the lead');
    expect(await dialog.textContent()).toContain(myTitle);
    await screenshot(engineer, 'e2e-05-conflict');

    await dialog.getByRole('button', { name: 'Decide later' }).click();
    expect(await engineer.getByLabel('Title').inputValue()).toBe(myTitle);

    await engineer.getByRole('button', { name: 'Save changes' }).click();
    await engineer.getByRole('dialog').getByRole('button', { name: 'Keep mine and overwrite' }).click();
    await engineer.getByText(`${SIF_TAG} saved (version 3)`).waitFor();
    expect(await engineer.getByLabel('Title').inputValue()).toBe(myTitle);

    await lead.reload();
    await lead.getByRole('heading', { name: SIF_TAG }).waitFor();
    await expect.poll(() => lead.getByLabel('Title').inputValue()).toBe(myTitle);
    await screenshot(engineer, 'e2e-06-conflict-overwritten');

    expect(pageErrors.flat()).toEqual([]);
  });
});
