import type { ChildProcess } from 'node:child_process';
import { readFile } from 'node:fs/promises';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { DEMO_MODEL, DEMO_MODEL_SIF_TAG } from '../../server/seed/demo-model.js';
import { pdfText } from '../api/helpers/pdf-text.js';
import { launchChromium, newSignedOutPage, screenshot, watchForPageErrors } from './browser.js';
import { startSolverProcess } from './solver-process.js';

// The seeded demo workspace (server/seed/demo-workspace.ts) with its demo model of PZT-1101
// (server/seed/demo-model.ts): 2oo3 transmitters, a logic solver and 1oo2 valves, target SIL 2.
const ENGINEER = { username: 'engineer', password: 'proofline-engineer' };
const DEMO_PROJECT = 'Brackwater Point Gas Terminal: export compression';

async function json<T>(page: Page, path: string): Promise<T> {
  const response = await page.request.get(`${inject('baseUrl')}${path}`);
  expect(response.status(), path).toBe(200);
  return (await response.json()) as T;
}

/** Pixels of a canvas that are not fully transparent. */
function paintedPixels(page: Page, selector: string): Promise<number> {
  return page.locator(selector).evaluate((canvas) => {
    const element = canvas as HTMLCanvasElement;
    const data = element.getContext('2d')?.getImageData(0, 0, element.width, element.height).data;
    let count = 0;
    for (let index = 3; data && index < data.length; index += 4) if (data[index] > 0) count++;
    return count;
  });
}

describe('the results of the demo function in a browser', () => {
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  let pageErrors: string[];
  let solver: ChildProcess;

  beforeAll(async () => {
    solver = startSolverProcess();
    browser = await launchChromium();
    ({ context, page } = await newSignedOutPage(browser));
    await page.setViewportSize({ width: 1440, height: 1000 });
    pageErrors = watchForPageErrors(page);
  });

  afterAll(async () => {
    await context?.close();
    await browser?.close();
    solver?.kill('SIGTERM');
  });

  it('solves the demo function, shows the verdict and the PFD(t) chart, runs the Monte Carlo check and the sensitivity and downloads the report', async () => {
    await page.goto(`${inject('baseUrl')}/projects`);
    await page.waitForURL(/\/sign-in/);
    await page.getByLabel('Username').fill(ENGINEER.username);
    await page.getByLabel('Password').fill(ENGINEER.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/projects$/);

    const projects = await json<{ id: string; name: string }[]>(page, '/api/projects');
    const project = projects.find((item) => item.name === DEMO_PROJECT);
    expect(project).toBeDefined();
    const sifs = await json<{ items: { id: string; tag: string }[] }>(page, `/api/projects/${project!.id}/sifs?search=${DEMO_MODEL_SIF_TAG}&pageSize=50`);
    const sif = sifs.items.find((item) => item.tag === DEMO_MODEL_SIF_TAG);
    expect(sif).toBeDefined();
    const models = await json<{ id: string; name: string }[]>(page, `/api/projects/${project!.id}/sifs/${sif!.id}/models`);
    const model = models.find((item) => item.name === DEMO_MODEL.name);
    expect(model).toBeDefined();

    await page.goto(`${inject('baseUrl')}/projects/${project!.id}/sifs/${sif!.id}/models/${model!.id}`);
    await page.getByRole('button', { name: 'Solve' }).click();
    await expect.poll(() => page.locator('[data-solve-status]').getAttribute('data-status'), { timeout: 60_000 }).toBe('succeeded');
    await page.locator('[data-results-link]').click();
    await page.waitForURL(/\/results\/[0-9a-f-]+$/);
    // From here on the page is the results workspace: only what it reports counts below (the model
    // editor's own checks are in canvas.e2e.ts).
    pageErrors.splice(0);

    // The verdict: the demo's PFDavg lies in the SIL 2 band [1e-3, 1e-2) of IEC 61508-1:2010 Table 2 and
    // meets the SIL 2 target; the claim is SIL 2 (Route 1H of the type A valves, SFF 33 %, HFT 1).
    await expect.poll(() => page.locator('[data-verdict-text]').textContent(), { timeout: 30_000 }).toContain('Meets the target (SIL 2)');
    const shownValue = (await page.locator('[data-measure-value]').textContent())!.trim();
    const pfdAvg = Number(shownValue);
    expect(pfdAvg).toBeGreaterThanOrEqual(1e-3);
    expect(pfdAvg).toBeLessThan(1e-2);
    expect((await page.locator('[data-sil-claim]').textContent())?.trim()).toBe('SIL 2');

    // The chart is drawn (a canvas with paint on it) and reads out values on hover.
    const canvas = '[data-pfd-chart] canvas';
    await page.locator(canvas).first().waitFor();
    await expect.poll(() => paintedPixels(page, `${canvas} >> nth=0`)).toBeGreaterThan(2000);
    await page.locator('[data-pfd-chart]').scrollIntoViewIfNeeded();
    const chart = await page.locator('[data-pfd-chart]').boundingBox();
    await page.mouse.move(chart!.x + chart!.width * 0.45, chart!.y + chart!.height * 0.4, { steps: 5 });
    await page.mouse.move(chart!.x + chart!.width * 0.5, chart!.y + chart!.height * 0.45, { steps: 5 });
    await expect.poll(() => page.locator('[data-pfd-chart]').textContent()).toContain('PFD(t)');
    await screenshot(page, 'results-01-verdict-and-chart');

    // The Monte Carlo check of the same draft: 100,000 seeded missions. Its 99 % interval must hold the
    // exact PFDavg (the same measure by another method), and the methods side by side list it.
    await page.locator('[data-run-monte-carlo]').click();
    await expect.poll(() => page.locator('[data-monte-carlo-status]').getAttribute('data-status'), { timeout: 60_000 }).toBe('succeeded');
    await expect.poll(() => page.locator('[data-monte-carlo-result] tr[data-measure="pfdAvg"]').textContent(), { timeout: 30_000 }).toContain('yes');
    const checkRow = (await page.locator('[data-monte-carlo-result] tr[data-measure="pfdAvg"]').textContent())!;
    expect(checkRow).toContain('99 %:');
    expect(checkRow).toContain(shownValue);
    expect(await page.locator('[data-methods]').textContent()).toContain('Monte Carlo (100000 missions)');
    await screenshot(page, 'results-02-monte-carlo-check');

    await page.getByLabel('Uncertainty samples').fill('40');
    await page.locator('[data-run-sensitivity]').click();
    await expect.poll(() => page.locator('[data-uncertainty-result]').count(), { timeout: 60_000 }).toBe(1);
    expect(await page.locator('[data-sweep-result]').textContent()).toContain('The longest interval that still meets the target');
    await screenshot(page, 'results-03-sensitivity');

    const [download] = await Promise.all([page.waitForEvent('download'), page.locator('[data-report-download]').click()]);
    expect(download.suggestedFilename()).toMatch(/^verification-PZT-1101-.*\.pdf$/);
    const { text, pages } = await pdfText(await readFile((await download.path())!));
    expect(pages).toBeGreaterThan(1);
    for (const expected of ['Verification report', `${DEMO_MODEL_SIF_TAG}: Inlet separator V-110 high-pressure shutdown`, `PFDavg ${shownValue}`, 'SIL claim: SIL 2', 'MTTFspurious', 'Monte Carlo (100000 missions)', 'does not replace competent judgement']) {
      expect(text).toContain(expected);
    }
    expect(pageErrors).toEqual([]);
  });
});
