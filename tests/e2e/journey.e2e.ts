import type { ChildProcess } from 'node:child_process';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { pdfText } from '../api/helpers/pdf-text.js';
import { launchChromium, newSignedOutPage, screenshot, signIn, watchForPageErrors } from './browser.js';
import { dragConnect, dropFromPalette, selectCard } from './canvas-steps.js';
import { startSolverProcess } from './solver-process.js';

// The whole journey of issue 10 in one browser run, on the seeded demo workspace
// (server/seed/demo-workspace.ts): the engineer signs in, creates a SIF in the register, draws a 1oo2 fault
// tree on the canvas by drag and connect, solves it and watches the progress, reads the verdict and the
// chart, exports the model file and imports it back through the file chooser, issues a revision and asks
// for a review; the reviewer (a second browser session) annotates and approves; the report is downloaded
// and read. Screenshots of each main screen go to test-artifacts/journey-*.png.

const ENGINEER = { username: 'engineer', password: 'proofline-engineer' };
const REVIEWER = { username: 'reviewer', password: 'proofline-reviewer', displayName: 'Rhea Reviewer (demo)' };
const DEMO_PROJECT = 'Brackwater Point Gas Terminal: export compression';
/** Unique per run: the e2e database is shared by the files of one run. */
const TAG = `LZJ-${Date.now() % 100_000}`;
const MISSION_HOURS = 87_600;
/** Both transmitters, typed in FIT on the canvas: 10,000 FIT = 1e-5 per hour (1 FIT = 1e-9 /h, common practice). */
const LAMBDA_FIT = 10_000;
const LAMBDA_PER_HOUR = 1e-5;
const TEST_INTERVAL_HOURS = 8760;
const REIMPORTED_LABEL = 'Reimported-TXA';
const ANNOTATION = 'Where does the yearly proof test interval come from?';
const APPROVAL = 'Interval confirmed by the maintenance plan.';
const REQUEST_MESSAGE = 'Please check the proof test interval of the transmitters.';

/**
 * PFDavg of a 1oo2 pair (AND gate) of identical, independent, perfectly proof-tested channels, q(t) =
 * 1 - exp(-λt) within each test interval τ (Rausand & Hoyland, System Reliability Theory, ch. 10 on
 * proof-tested items), averaged over one interval (the mission is ten whole intervals):
 * (1/τ)∫₀^τ (1 - e^{-λt})² dt = 1 - 2(1 - e^{-a})/a + (1 - e^{-2a})/(2a), a = λτ (integrated by hand).
 */
function reference1oo2PfdAvg(lambda: number, tau: number): number {
  const a = lambda * tau;
  return 1 - (2 * (1 - Math.exp(-a))) / a + (1 - Math.exp(-2 * a)) / (2 * a);
}

/** Pixels of a canvas that are not fully transparent. */
function paintedPixels(page: Page, selector: string): Promise<number> {
  return page.locator(selector).evaluate((canvas) => {
    const element = canvas as HTMLCanvasElement;
    const data = element.getContext('2d')?.getImageData(0, 0, element.width, element.height).data;
    let count = 0;
    for (let index = 3; data && index < data.length; index += 4) if (data[index]! > 0) count++;
    return count;
  });
}

interface SolveSighting {
  readonly status: string | null;
  readonly progressBar: boolean;
  readonly text: string;
}

/** Records, every 25 ms, what the model editor's solve status shows, so the progress can be checked afterwards. */
async function watchSolveStatus(page: Page): Promise<void> {
  await page.evaluate(() => {
    const seen: SolveSighting[] = [];
    (window as unknown as { solveSightings: SolveSighting[] }).solveSightings = seen;
    const timer = setInterval(() => {
      const status = document.querySelector('[data-solve-status]');
      if (!status) return;
      const sighting = { status: status.getAttribute('data-status'), progressBar: status.querySelector('mat-progress-bar') !== null, text: (status.textContent ?? '').trim() };
      const last = seen.at(-1);
      if (!last || last.status !== sighting.status || last.text !== sighting.text) seen.push(sighting);
      if (sighting.status === 'succeeded' || sighting.status === 'failed' || sighting.status === 'cancelled') clearInterval(timer);
    }, 25);
  });
}

async function solveSightings(page: Page): Promise<SolveSighting[]> {
  return page.evaluate(() => (window as unknown as { solveSightings: SolveSighting[] }).solveSightings);
}

/** Clicks Solve, and checks the progress was shown while the solve waited and ran, and that it succeeded. */
async function solveWithProgress(page: Page, name: string): Promise<void> {
  await watchSolveStatus(page);
  await page.getByRole('button', { name: 'Solve' }).click();
  await page.locator('[data-solve-status] mat-progress-bar').waitFor().catch(() => undefined);
  await screenshot(page, name);
  await expect.poll(() => page.locator('[data-solve-status]').getAttribute('data-status'), { timeout: 120_000 }).toBe('succeeded');
  const seen = await solveSightings(page);
  const before = seen.filter((sighting) => sighting.status === 'queued' || sighting.status === 'running');
  expect(before.length, JSON.stringify(seen)).toBeGreaterThan(0);
  expect(before.every((sighting) => sighting.progressBar), JSON.stringify(seen)).toBe(true);
  for (const sighting of before) {
    expect(sighting.text, JSON.stringify(seen)).toMatch(/Waiting for a solver|Solving: \d{1,3} %/);
    const percent = /Solving: (\d+) %/.exec(sighting.text);
    if (percent) expect(Number(percent[1])).toBeLessThanOrEqual(100);
  }
  expect(seen.at(-1)?.text).toContain('Solved');
}

describe('the whole journey in a browser', () => {
  let browser: Browser;
  let solver: ChildProcess;
  const contexts: BrowserContext[] = [];

  beforeAll(async () => {
    solver = startSolverProcess();
    browser = await launchChromium();
  });

  afterAll(async () => {
    for (const context of contexts) await context.close();
    await browser?.close();
    solver?.kill('SIGTERM');
  });

  async function open(): Promise<{ page: Page; errors: string[] }> {
    const { context, page } = await newSignedOutPage(browser);
    contexts.push(context);
    await page.setViewportSize({ width: 1600, height: 1000 });
    return { page, errors: watchForPageErrors(page) };
  }

  it('signs in, creates a SIF, draws, solves, reads, exports and re-imports, has it reviewed and approved, and downloads the report', async () => {
    const base = inject('baseUrl');
    const engineer = await open();
    const page = engineer.page;
    try {
      // 1. Sign in, and the register of the demo project.
      await page.goto(`${base}/sign-in`);
      await page.getByLabel('Username').waitFor();
      await screenshot(page, 'journey-01-sign-in');
      await signIn(page, base, ENGINEER);
      await page.getByText(DEMO_PROJECT, { exact: true }).waitFor();
      await screenshot(page, 'journey-02-projects');
      await page.getByText(DEMO_PROJECT, { exact: true }).click();
      await page.locator('tr[data-sif]').first().waitFor();
      await screenshot(page, 'journey-03-register');

      // 2. A new SIF, target SIL 2, mission ten years.
      await page.getByRole('link', { name: 'New SIF' }).click();
      await page.getByRole('heading', { name: 'New SIF' }).waitFor();
      await page.getByLabel('Tag').fill(TAG);
      await page.getByLabel('Title').fill('Slug catcher high level trip');
      await page.getByLabel('Hazardous event it protects against').fill('Liquid carry-over from the slug catcher into the compressor suction.');
      await page.getByRole('combobox', { name: 'Target SIL' }).click();
      await page.getByRole('option', { name: 'SIL 2' }).click();
      await page.getByLabel('Mission time').fill(String(MISSION_HOURS));
      await screenshot(page, 'journey-04-new-sif');
      await page.getByRole('button', { name: 'Create SIF' }).click();
      const row = page.locator(`tr[data-sif="${TAG}"]`);
      await row.waitFor();
      expect(await row.textContent()).toContain('Slug catcher high level trip');
      await row.click();
      await page.waitForURL(/\/sifs\/[^/]+$/);
      await page.locator('[data-sif-models-link]').waitFor();
      await screenshot(page, 'journey-05-sif');
      await page.locator('[data-sif-models-link]').click();
      await page.getByRole('heading', { name: `Models of ${TAG}` }).waitFor();
      await screenshot(page, 'journey-06-models');

      // 3. The canvas: the starter event removed, an AND gate (the new top) over two transmitters, by drag and connect.
      await page.getByRole('button', { name: 'New fault tree' }).click();
      await page.waitForURL(/\/models\/[^/]+$/);
      await page.locator('[data-node="event:E1"]').waitFor();
      await selectCard(page, 'event:E1');
      await page.keyboard.press('Delete');
      await expect.poll(() => page.locator('[data-node]').count()).toBe(0);
      await dropFromPalette(page, 'and', 400, 30);
      await dropFromPalette(page, 'rateEvent', 150, 330);
      await dropFromPalette(page, 'rateEvent', 650, 330);
      await expect.poll(() => page.locator('[data-node]').count()).toBe(3);
      expect(await page.locator('[data-node="gate:G1"]').getAttribute('class')).toContain('card-top');
      await dragConnect(page, 'event:E1', 'gate:G1');
      await dragConnect(page, 'event:E2', 'gate:G1');
      await expect.poll(() => page.locator('f-connection.link-input').count()).toBe(2);
      for (const event of ['E1', 'E2']) {
        await selectCard(page, `event:${event}`);
        await page.getByRole('combobox', { name: 'Rates in' }).click();
        await page.getByRole('option', { name: 'FIT' }).click();
        await page.getByLabel('λDU, dangerous undetected').fill(String(LAMBDA_FIT));
        await expect.poll(() => page.locator(`[data-node="event:${event}"]`).textContent()).toContain('λDU 1.0e-5 /h');
      }
      await page.locator('f-flow').click({ position: { x: 5, y: 5 } });
      await expect.poll(() => page.locator('[data-save-state]').textContent(), { timeout: 20_000 }).toBe('All changes saved');
      await screenshot(page, 'journey-07-canvas');

      // 4. Solve with progress, then the verdict and the chart on the results page.
      await solveWithProgress(page, 'journey-08-solving');
      await page.locator('[data-solve-status] [data-results-link]').click();
      await page.waitForURL(/\/results\/[0-9a-f-]+$/);
      const expected = reference1oo2PfdAvg(LAMBDA_PER_HOUR, TEST_INTERVAL_HOURS);
      // The reference lies in the SIL 2 band [1e-3, 1e-2) of IEC 61508-1:2010 Table 2, so the SIL 2 target is met.
      expect(expected).toBeGreaterThanOrEqual(1e-3);
      expect(expected).toBeLessThan(1e-2);
      await expect.poll(() => page.locator('[data-verdict-text]').textContent(), { timeout: 30_000 }).toContain('Meets the target (SIL 2)');
      const shown = (await page.locator('[data-measure-value]').textContent())!.trim();
      // The figure as shown (rounded for display): within 0.5 % of the closed form.
      expect(Math.abs(Number(shown) - expected) / expected).toBeLessThan(5e-3);
      await page.locator('[data-pfd-chart] canvas').first().waitFor();
      await expect.poll(() => paintedPixels(page, '[data-pfd-chart] canvas >> nth=0')).toBeGreaterThan(2000);
      const [, projectId, sifId, modelId] = /\/projects\/([^/]+)\/sifs\/([^/]+)\/models\/([^/]+)\/results\//.exec(page.url())!;
      const firstSolve = page.url().split('/').pop()!;
      const solved = (await (await page.request.get(`${base}/api/projects/${projectId}/solves/${firstSolve}`)).json()) as { result: { pfdAvg: number } };
      // The stored figure: relative tolerance 1e-3 (the solver's time grid).
      expect(Math.abs(solved.result.pfdAvg - expected) / expected).toBeLessThan(1e-3);
      await screenshot(page, 'journey-09-results');

      // 5. Export the model file, change a label in it, and import it back through the file chooser.
      const editorUrl = `${base}/projects/${projectId}/sifs/${sifId}/models/${modelId}`;
      await page.goto(editorUrl);
      await page.locator('[data-node="gate:G1"]').waitFor();
      const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Export' }).click()]);
      expect(download.suggestedFilename()).toMatch(/\.proofline\.json$/);
      const exported = JSON.parse(await readFile((await download.path())!, 'utf8'));
      expect(exported).toMatchObject({ format: 'proofline/model', kind: 'fault-tree', top: 'G1', mission: { hours: MISSION_HOURS } });
      expect(exported.gates).toHaveLength(1);
      expect(exported.gates[0]).toMatchObject({ id: 'G1', type: 'and' });
      expect([...exported.gates[0].inputs].sort()).toEqual(['E1', 'E2']);
      expect(exported.events.map((event: { id: string }) => event.id).sort()).toEqual(['E1', 'E2']);
      for (const event of exported.events) {
        expect(Math.abs(event.lambdaDU - LAMBDA_PER_HOUR) / LAMBDA_PER_HOUR).toBeLessThan(1e-12);
        expect(event.proofTest.intervalHours).toBe(TEST_INTERVAL_HOURS);
      }
      const changed = { ...exported, events: exported.events.map((event: { id: string }) => (event.id === 'E1' ? { ...event, label: REIMPORTED_LABEL } : event)) };
      const folder = await mkdtemp(join(tmpdir(), 'proofline-journey-'));
      const file = join(folder, `${TAG}.proofline.json`);
      await writeFile(file, JSON.stringify(changed, null, 2));
      const versionBefore = (await page.locator('.title-row .muted').textContent()) ?? '';
      const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.getByRole('button', { name: 'Import' }).click()]);
      await chooser.setFiles(file);
      await page.getByText(`Imported ${TAG}.proofline.json`).waitFor();
      await rm(folder, { recursive: true, force: true });
      await expect.poll(() => page.locator('[data-node="event:E1"]').textContent()).toContain(REIMPORTED_LABEL);
      expect(await page.locator('.title-row .muted').textContent()).not.toBe(versionBefore);
      await expect.poll(() => page.locator('[data-save-state]').textContent(), { timeout: 20_000 }).toBe('All changes saved');
      await page.reload();
      await expect.poll(() => page.locator('[data-node="event:E1"]').textContent()).toContain(REIMPORTED_LABEL);
      await expect.poll(() => page.locator('f-connection.link-input').count()).toBe(2);
      await screenshot(page, 'journey-10-reimported');

      // 6. Revision 1 issued, the draft (now the re-imported file) solved again, and a review asked of the demo reviewer.
      await page.getByRole('button', { name: 'Issue revision' }).click();
      await page.getByLabel('Reason for the revision').fill('First issue for review');
      await page.getByRole('dialog').getByRole('button', { name: 'Issue revision' }).click();
      await page.getByText('Revision 1 issued.').waitFor();
      await solveWithProgress(page, 'journey-11-solving-again');
      const reportResults = (await page.locator('[data-solve-status] [data-results-link]').getAttribute('href'))!;
      await page.getByRole('button', { name: 'Review', exact: true }).click();
      const request = page.getByRole('form', { name: 'Request review' });
      await request.getByLabel(new RegExp(REVIEWER.displayName.replace(/[()]/g, '\\$&'))).check();
      await request.getByLabel('Message').fill(REQUEST_MESSAGE);
      await request.getByRole('button', { name: 'Request review' }).click();
      await expect.poll(() => page.locator('[data-review-round]').getAttribute('data-status')).toBe('open');
      await screenshot(page, 'journey-12-review-requested');

      // 7. The reviewer, in a second session: the queue, an annotation on the top gate, and the approval.
      const reviewer = await open();
      await signIn(reviewer.page, base, REVIEWER);
      await reviewer.page.goto(`${base}/reviews`);
      const queued = reviewer.page.locator('[data-queue-round]').filter({ hasText: TAG });
      await queued.waitFor();
      await screenshot(reviewer.page, 'journey-13-review-queue');
      await queued.getByRole('link').click();
      await reviewer.page.waitForURL(/\/models\//);
      await reviewer.page.getByRole('button', { name: 'Review', exact: true }).click();
      const annotate = reviewer.page.getByRole('form', { name: 'New annotation' });
      await annotate.getByLabel('Pin to').selectOption('gate:G1');
      await annotate.getByLabel('Severity').selectOption('question');
      await annotate.getByLabel('Comment').fill(ANNOTATION);
      await annotate.getByRole('button', { name: 'Add annotation' }).click();
      await reviewer.page.locator('[data-annotation="G1"][data-status="open"]').waitFor();
      await expect.poll(() => reviewer.page.locator('[data-node="gate:G1"] [data-pin="gate:G1"]').count()).toBe(1);
      await screenshot(reviewer.page, 'journey-14-annotated');
      await reviewer.page.getByLabel('Decision comment').fill(APPROVAL);
      await reviewer.page.getByRole('button', { name: 'Approve' }).click();
      await expect.poll(() => reviewer.page.locator('[data-review-round]').getAttribute('data-status')).toBe('approved');
      await screenshot(reviewer.page, 'journey-15-approved');
      const sif = (await (await reviewer.page.request.get(`${base}/api/projects/${projectId}/sifs/${sifId}`)).json()) as { status: string };
      expect(sif.status).toBe('approved');

      // 8. The engineer downloads the report of the second solve and reads it: the re-imported label, the round and its comments.
      await page.goto(`${base}${reportResults}`);
      await page.locator('[data-verdict-text]').waitFor();
      const reportShown = (await page.locator('[data-measure-value]').textContent())!.trim();
      await screenshot(page, 'journey-16-results-again');
      const [report] = await Promise.all([page.waitForEvent('download'), page.locator('[data-report-download]').click()]);
      expect(report.suggestedFilename()).toMatch(new RegExp(`^verification-${TAG}-.*\\.pdf$`));
      const { text, pages } = await pdfText(await readFile((await report.path())!));
      expect(pages).toBeGreaterThan(1);
      for (const wanted of [
        `${TAG}: Slug catcher high level trip`,
        `PFDavg ${reportShown}`,
        REIMPORTED_LABEL,
        'Review and approvals',
        REQUEST_MESSAGE,
        'approved',
        REVIEWER.displayName,
        APPROVAL,
        ANNOTATION,
      ]) {
        expect(text, `the report lacks "${wanted}"`).toContain(wanted);
      }
      expect([...engineer.errors, ...reviewer.errors]).toEqual([]);
    } catch (error) {
      await screenshot(page, 'journey-failure');
      throw error;
    }
  });
});
