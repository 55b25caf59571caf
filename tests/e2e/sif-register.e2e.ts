import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, newSignedOutPage, screenshot, watchForPageErrors } from './browser.js';

// The seeded demo workspace (server/seed/demo-workspace.ts): the demo engineer and the terminal's
// export compression project with its SIF register.
const ENGINEER = { username: 'engineer', password: 'proofline-engineer', displayName: 'Ezra Engineer (demo)' };
const DEMO_PROJECT = 'Brackwater Point Gas Terminal: export compression';
const NEW_TAG = 'PZT-1999';

describe('the SIF register in a browser', () => {
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  let pageErrors: string[];

  beforeAll(async () => {
    browser = await launchChromium();
    ({ context, page } = await newSignedOutPage(browser));
    pageErrors = watchForPageErrors(page);
  });

  afterAll(async () => {
    await context?.close();
    await browser?.close();
  });

  it('signs in as the demo engineer, creates a SIF in the demo project and finds it in the register', async () => {
    await page.goto(`${inject('baseUrl')}/projects`);
    await page.waitForURL(/\/sign-in\?returnUrl=%2Fprojects$/);
    await page.getByLabel('Username').fill(ENGINEER.username);
    await page.getByLabel('Password').fill(ENGINEER.password);
    await screenshot(page, 'e2e-01-sign-in');
    await page.getByRole('button', { name: 'Sign in' }).click();

    await page.waitForURL(/\/projects$/);
    await expect.poll(() => page.locator('mat-toolbar').textContent()).toContain(ENGINEER.displayName);
    await page.getByText(DEMO_PROJECT, { exact: true }).click();
    await page.getByRole('heading', { name: DEMO_PROJECT }).waitFor();
    await page.locator('tr[data-sif]').first().waitFor();
    await expect.poll(() => registerCount(page)).toBeGreaterThan(0);
    const seededCount = await registerCount(page);
    await screenshot(page, 'e2e-02-register');

    await page.getByRole('link', { name: 'New SIF' }).click();
    await page.getByRole('heading', { name: 'New SIF' }).waitFor();
    await page.getByLabel('Tag').fill(NEW_TAG);
    await page.getByLabel('Title').fill('Export pipeline pig trap door interlock');
    await page.getByLabel('Hazardous event it protects against').fill('Pig trap door opened under pressure, gas release at the launcher.');
    await page.getByRole('combobox', { name: 'Target given as' }).click();
    await page.getByRole('option', { name: 'RRF' }).click();
    await page.getByLabel('Target RRF').fill('500');
    await page.getByLabel('Demand rate (optional)').fill('0.05');
    await page.getByLabel('Mission time').fill('175200');
    // IEC 61508-1:2010 Table 2: RRF 500 is PFDavg 2e-3, inside the SIL 2 band [1e-3, 1e-2).
    await expect.poll(() => page.locator('[data-derived=sil]').textContent()).toBe('SIL 2');
    expect(await page.locator('[data-derived=pfdAvg]').textContent()).toContain('2.00e-3');
    await screenshot(page, 'e2e-03-new-sif');
    await page.getByRole('button', { name: 'Create SIF' }).click();

    await page.getByRole('heading', { name: DEMO_PROJECT }).waitFor();
    const newRow = page.locator(`tr[data-sif="${NEW_TAG}"]`);
    await newRow.waitFor();
    expect(await newRow.textContent()).toContain('Export pipeline pig trap door interlock');
    expect(await newRow.textContent()).toContain('RRF 500 (SIL 2)');
    expect(await newRow.textContent()).toContain('Draft');
    await expect.poll(() => registerCount(page)).toBe(seededCount + 1);

    await page.getByLabel('Search tag, title or hazardous event').fill('pig trap');
    await expect.poll(() => page.locator('tr[data-sif]').count()).toBe(1);
    expect(await page.locator('tr[data-sif]').first().textContent()).toContain(NEW_TAG);
    await screenshot(page, 'e2e-04-register-with-new-sif');

    expect(pageErrors).toEqual([]);
  });
});

/** The register's own count of the functions matching its filters ("8 functions"). */
async function registerCount(page: Page): Promise<number> {
  const text = (await page.locator('.register-header .count').textContent()) ?? '';
  const match = /^(\d+) functions?$/.exec(text.trim());
  if (!match) throw new Error(`no count in the register header: "${text}"`);
  return Number(match[1]);
}
