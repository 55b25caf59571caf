import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, newSignedOutPage, screenshot } from './browser.js';

// Accessibility of the main screens (issue 10): axe-core 4 with its WCAG 2 A/AA rules finds no serious or
// critical violation (axe's own impact levels), and the sign-in, the SIF register and the canvas palette work
// with the keyboard alone. The demo workspace is the seeded one (server/seed/demo-workspace.ts).

const LEAD = { username: 'lead', password: 'proofline-lead' };
const DEMO_PROJECT = 'Brackwater Point Gas Terminal: export compression';
const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');

interface AxeViolation {
  id: string;
  impact: string | null;
  help: string;
  nodes: { target: unknown[] }[];
}

/** Serious and critical violations on the page as it is now, one line each, naming the elements. */
async function seriousViolations(page: Page): Promise<string[]> {
  // Evaluated through the DevTools protocol, so the page's Content-Security-Policy stays as served.
  await page.evaluate(AXE_SOURCE);
  const violations = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run(context: Document, options: object): Promise<{ violations: AxeViolation[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] } });
    return result.violations;
  });
  return violations
    .filter((violation) => violation.impact === 'serious' || violation.impact === 'critical')
    .map((violation) => `${violation.impact} ${violation.id}: ${violation.help} at ${violation.nodes.map((node) => JSON.stringify(node.target)).join(', ')}`);
}

/** Presses Tab until the focused element matches the selector (or a focused element's text contains the text). */
async function tabTo(page: Page, selector: string, text?: string, maxPresses = 60): Promise<void> {
  for (let press = 0; press < maxPresses; press++) {
    await page.keyboard.press('Tab');
    const found = await page.evaluate(
      ([wanted, wantedText]) => {
        const active = document.activeElement;
        if (!active || !active.matches(wanted!)) return false;
        return wantedText === null || (active.textContent ?? '').includes(wantedText!);
      },
      [selector, text ?? null] as const,
    );
    if (found) return;
  }
  throw new Error(`no element ${selector}${text ? ` with "${text}"` : ''} within ${maxPresses} presses of Tab`);
}

describe('accessibility in a browser', () => {
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;

  beforeAll(async () => {
    browser = await launchChromium();
    ({ context, page } = await newSignedOutPage(browser));
  });

  afterAll(async () => {
    await context?.close();
    await browser?.close();
  });

  it('signs in, opens the register and a SIF, and adds from the canvas palette with the keyboard alone', async () => {
    await page.goto(`${inject('baseUrl')}/projects`);
    await page.waitForURL(/\/sign-in/);
    await page.getByLabel('Username').waitFor();
    // The username field takes the focus on arrival (autofocus), so typing starts there.
    await expect.poll(() => page.evaluate(() => document.activeElement?.getAttribute('autocomplete'))).toBe('username');
    await page.keyboard.type(LEAD.username);
    await page.keyboard.press('Tab');
    await page.keyboard.type(LEAD.password);
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/projects$/);

    await tabTo(page, 'a, button, [tabindex], tr', DEMO_PROJECT);
    await page.keyboard.press('Enter');
    await page.getByRole('heading', { name: DEMO_PROJECT }).waitFor();
    await page.locator('tr[data-sif]').first().waitFor();
    await tabTo(page, 'tr[data-sif], tr[data-sif] a, tr[data-sif] button');
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/sifs\/[^/]+$/);

    await tabTo(page, '[data-sif-models-link]');
    await page.keyboard.press('Enter');
    await page.getByRole('button', { name: 'New fault tree' }).waitFor();
    await tabTo(page, 'button', 'New fault tree');
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/models\/[^/]+$/);
    await page.locator('[data-node]').first().waitFor();
    const before = await page.locator('[data-node]').count();
    await tabTo(page, '[data-palette]', undefined, 120);
    await page.keyboard.press('Enter');
    await expect.poll(() => page.locator('[data-node]').count()).toBe(before + 1);
  });

  it('has no serious or critical axe violation on the main screens', async () => {
    const { context: fresh, page: signIn } = await newSignedOutPage(browser);
    const found: string[] = [];
    const check = async (target: Page, name: string) => {
      await screenshot(target, `a11y-${name}`);
      for (const line of await seriousViolations(target)) found.push(`${name}: ${line}`);
    };
    await signIn.goto(`${inject('baseUrl')}/sign-in`);
    await signIn.getByLabel('Username').waitFor();
    await check(signIn, 'sign-in');
    await fresh.close();

    // The keyboard test left this page signed in as the lead on a new model's canvas.
    await check(page, 'canvas');
    const canvasUrl = page.url();
    const sifUrl = canvasUrl.replace(/\/models\/[^/]+$/, '');
    await page.goto(`${inject('baseUrl')}/projects`);
    await page.getByText(DEMO_PROJECT, { exact: true }).waitFor();
    await check(page, 'projects');
    await page.getByText(DEMO_PROJECT, { exact: true }).click();
    await page.locator('tr[data-sif]').first().waitFor();
    await check(page, 'sif-register');
    await page.goto(sifUrl);
    await page.locator('[data-sif-models-link]').waitFor();
    await check(page, 'sif');
    await page.goto(`${sifUrl}/models`);
    await page.getByRole('button', { name: 'New fault tree' }).waitFor();
    await check(page, 'models');
    await page.goto(`${inject('baseUrl')}/devices`);
    await page.locator('main, [role="main"]').first().waitFor();
    await page.waitForLoadState('networkidle');
    await check(page, 'devices');
    await page.goto(`${inject('baseUrl')}/reviews`);
    await page.waitForLoadState('networkidle');
    await check(page, 'reviews');
    expect(found).toEqual([]);
  });
});
