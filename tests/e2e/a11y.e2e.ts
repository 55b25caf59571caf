import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { ChildProcess } from 'node:child_process';
import { DEMO_MODEL, DEMO_MODEL_SIF_TAG } from '../../server/seed/demo-model.js';
import { launchChromium, newSignedOutPage, screenshot, signIn } from './browser.js';
import { startSolverProcess } from './solver-process.js';

// Accessibility of the main screens (issue 10): axe-core 4 with its WCAG 2 A/AA rules finds no serious or
// critical violation (axe's own impact levels), and the sign-in, the SIF register and the canvas palette work
// with the keyboard alone. The demo workspace is the seeded one (server/seed/demo-workspace.ts).

const LEAD = { username: 'lead', password: 'proofline-lead' };
const ADMIN = { username: 'admin', password: 'proofline-admin' };
/** The SIF the keyboard test creates (unique per run; the e2e database is shared by the files of one run). */
const KEYBOARD_TAG = `KB-${Date.now() % 100000}`;
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

  it('signs in, creates a SIF in the register, and builds on the canvas from the palette with the keyboard alone', async () => {
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

    // A new SIF in the register, every field reached with Tab and every choice made with the keys.
    await tabTo(page, 'a', 'New SIF');
    await page.keyboard.press('Enter');
    await page.getByRole('heading', { name: 'New SIF' }).waitFor();
    await tabTo(page, 'input[formcontrolname="tag"]');
    await page.keyboard.type(KEYBOARD_TAG);
    await tabTo(page, 'input[formcontrolname="title"]');
    await page.keyboard.type('Flare knock-out drum high level, keyboard entry');
    await tabTo(page, 'textarea[formcontrolname="hazardousEvent"]');
    await page.keyboard.type('Liquid carry-over to the flare tip.');
    await tabTo(page, 'mat-select[formcontrolname="targetValue"]');
    // Open the list with Enter, move to the second level and take it: SIL 2.
    await page.keyboard.press('Enter');
    await page.getByRole('option', { name: 'SIL 1' }).waitFor();
    await page.keyboard.press('ArrowDown');
    await page.keyboard.press('Enter');
    await expect.poll(() => page.locator('mat-select[formcontrolname="targetValue"]').textContent()).toContain('SIL 2');
    await tabTo(page, 'input[formcontrolname="missionHours"]');
    await page.keyboard.type('87600');
    await page.keyboard.press('Enter');
    const newRow = page.locator(`tr[data-sif="${KEYBOARD_TAG}"]`);
    await newRow.waitFor();
    expect(await newRow.textContent()).toContain('SIL 2');

    await tabTo(page, `tr[data-sif="${KEYBOARD_TAG}"], tr[data-sif="${KEYBOARD_TAG}"] a`);
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/sifs\/[^/]+$/);
    await tabTo(page, '[data-sif-models-link]');
    await page.keyboard.press('Enter');
    await page.getByRole('button', { name: 'New fault tree' }).waitFor();
    await tabTo(page, 'button', 'New fault tree');
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/models\/[^/]+$/);
    await page.locator('[data-node]').first().waitFor();

    // The palette: an OR gate added with Enter; the starter event (a new tree's only card) is then connected
    // into it with C on the event, Tab to the gate and Enter.
    const nodeIds = () => page.locator('[data-node]').evaluateAll((cards) => cards.map((card) => card.getAttribute('data-node')!));
    const before = await nodeIds();
    expect(before).toHaveLength(1);
    const connectionsBefore = await page.locator('f-connection.link-input').count();
    await tabTo(page, '[data-palette="or"]', undefined, 120);
    await page.keyboard.press('Enter');
    await expect.poll(async () => (await nodeIds()).length).toBe(2);
    const gate = (await nodeIds()).find((id) => !before.includes(id))!;
    expect(await page.locator(`[data-node="${gate}"]`).getAttribute('aria-label')).toMatch(/OR/i);
    await tabTo(page, `[data-node="${before[0]}"]`, undefined, 120);
    await page.keyboard.press('c');
    await tabTo(page, `[data-node="${gate}"]`, undefined, 120);
    await page.keyboard.press('Enter');
    await expect.poll(() => page.locator('f-connection.link-input').count()).toBe(connectionsBefore + 1);
    await screenshot(page, 'a11y-keyboard-canvas');
  });

  it('has no serious or critical axe violation on the main screens', async () => {
    const { context: fresh, page: signInPage } = await newSignedOutPage(browser);
    const found: string[] = [];
    const check = async (target: Page, name: string) => {
      await screenshot(target, `a11y-${name}`);
      for (const line of await seriousViolations(target)) found.push(`${name}: ${line}`);
    };
    await signInPage.goto(`${inject('baseUrl')}/sign-in`);
    await signInPage.getByLabel('Username').waitFor();
    // The check can fail: an image without a text alternative is a critical axe violation (WCAG 2 1.1.1).
    await signInPage.evaluate(() => {
      const probe = document.createElement('img');
      probe.id = 'axe-probe';
      probe.src = 'data:image/gif;base64,R0lGODlhAQABAAAAACw=';
      document.body.append(probe);
    });
    expect((await seriousViolations(signInPage)).join('\n')).toContain('critical image-alt');
    await signInPage.evaluate(() => document.getElementById('axe-probe')?.remove());
    await check(signInPage, 'sign-in');
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

  it('has no serious or critical axe violation on the other screens, and attaches evidence through the file chooser', async () => {
    const solver: ChildProcess = startSolverProcess();
    const found: string[] = [];
    const check = async (target: Page, name: string) => {
      await target.waitForLoadState('networkidle');
      await screenshot(target, `a11y-${name}`);
      for (const line of await seriousViolations(target)) found.push(`${name}: ${line}`);
    };
    const base = inject('baseUrl');
    const { context: leadContext, page: lead } = await newSignedOutPage(browser);
    const { context: adminContext, page: admin } = await newSignedOutPage(browser);
    try {
      await signIn(lead, base, LEAD);
      const projects = (await (await lead.request.get(`${base}/api/projects`)).json()) as { id: string; name: string }[];
      const project = projects.find((item) => item.name === DEMO_PROJECT)!;
      expect(project).toBeDefined();
      const sifs = (await (await lead.request.get(`${base}/api/projects/${project.id}/sifs?search=${DEMO_MODEL_SIF_TAG}`)).json()) as { items: { id: string; tag: string }[] };
      const sif = sifs.items.find((item) => item.tag === DEMO_MODEL_SIF_TAG)!;
      const models = (await (await lead.request.get(`${base}/api/projects/${project.id}/sifs/${sif.id}/models`)).json()) as { id: string; name: string }[];
      const model = models.find((item) => item.name === DEMO_MODEL.name)!;
      expect(model).toBeDefined();
      const sifPath = `${base}/projects/${project.id}/sifs/${sif.id}`;

      // The demo model in its editor (canvas, review panel), solved, and its results.
      await lead.goto(`${sifPath}/models/${model.id}`);
      await lead.locator('[data-node]').first().waitFor();
      await check(lead, 'model-editor-with-review-panel');
      await lead.getByRole('button', { name: 'Solve' }).click();
      await expect.poll(() => lead.locator('[data-solve-status]').getAttribute('data-status'), { timeout: 90_000 }).toBe('succeeded');
      await lead.locator('[data-solve-status] [data-results-link]').click();
      await lead.waitForURL(/\/results\/[0-9a-f-]+$/);
      await lead.locator('[data-verdict-text]').waitFor();
      await lead.locator('[data-pfd-chart] canvas').first().waitFor();
      await check(lead, 'results');

      await lead.goto(`${base}/projects/${project.id}/sifs/new`);
      await lead.getByLabel('Tag').waitFor();
      await check(lead, 'sif-new');
      await lead.goto(`${sifPath}/models/new-from-architecture`);
      await lead.locator('main').first().waitFor();
      await check(lead, 'architecture-wizard');
      await lead.goto(`${base}/projects/${project.id}/members`);
      await lead.getByText('Rhea Reviewer (demo)').first().waitFor();
      await check(lead, 'members');
      await lead.goto(`${base}/projects/${project.id}/audit`);
      await lead.locator('main').first().waitFor();
      await check(lead, 'audit');
      await lead.goto(`${base}/devices/import`);
      await lead.locator('main').first().waitFor();
      await check(lead, 'device-import');
      await lead.goto(`${base}/devices/new`);
      await lead.getByLabel('Maker').waitFor();
      await check(lead, 'device-new');

      // A device record with a certificate attached through the page: the upload is multipart, which the
      // server takes only with the client's X-Proofline-Request header (server/security/cross-site-requests.ts).
      const devices = (await (await lead.request.get(`${base}/api/devices`)).json()) as { id: string }[];
      expect(devices.length).toBeGreaterThan(0);
      await lead.goto(`${base}/devices/${devices[0]!.id}`);
      const chooser = lead.locator('section[aria-label="Evidence"] input[type="file"]');
      await chooser.waitFor({ state: 'attached' });
      const fileName = `certificate-${Date.now()}.pdf`;
      await chooser.setInputFiles({ name: fileName, mimeType: 'application/pdf', buffer: Buffer.from('%PDF-1.4\n1 0 obj <<>> endobj\n%%EOF\n') });
      await lead.locator('section[aria-label="Evidence"] a', { hasText: fileName }).waitFor();
      await check(lead, 'device-record');

      await lead.goto(`${base}/about`);
      await lead.locator('main').first().waitFor();
      await check(lead, 'about');
      await lead.goto(`${base}/no-such-page`);
      await lead.locator('main').first().waitFor();
      await check(lead, 'not-found');

      await signIn(admin, base, ADMIN);
      await admin.goto(`${base}/admin/users`);
      await admin.getByText('Rhea Reviewer (demo)').first().waitFor();
      await check(admin, 'admin-users');
      await admin.goto(`${base}/admin/mail`);
      await admin.locator('main').first().waitFor();
      await check(admin, 'admin-mail');
    } finally {
      await leadContext.close();
      await adminContext.close();
      solver.kill('SIGTERM');
    }
    expect(found).toEqual([]);
  });
});
