import { spawn, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, screenshot, watchForPageErrors } from './browser.js';
import { dragConnect, dropFromPalette, selectCard } from './canvas-steps.js';

// The seeded demo workspace (server/seed/demo-workspace.ts): the demo engineer, and TZT-1310, a SIF in
// draft status of the terminal project (mission ten years).
const ENGINEER = { username: 'engineer', password: 'proofline-engineer' };
const DEMO_PROJECT = 'Brackwater Point Gas Terminal: export compression';
const SIF_TAG = 'TZT-1310';
const ROOT = fileURLToPath(new URL('../..', import.meta.url));

/** The e2e server runs without a solver (PROOFLINE_SOLVER=off); this test starts one on the same database. */
function startSolverProcess(): ChildProcess {
  const databaseUrl = process.env.E2E_DATABASE_URL;
  if (!databaseUrl) throw new Error('E2E_DATABASE_URL is not set (see tests/e2e/global-setup.ts)');
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/solve-worker-main.ts'], {
    cwd: ROOT,
    env: { ...process.env, DATABASE_URL: databaseUrl },
    stdio: ['ignore', 'inherit', 'inherit'],
  });
  return child;
}

/**
 * PFDavg of the function built below, from the exact unavailability of each event under its proof test
 * (q(t) = 1 - exp(-λ τ), τ the time since the last test; perfect test, no repair time) combined exactly:
 * 2oo3 fails with probability 3q² - 2q³ (identical, independent channels), 1oo2 with qa·qb, and the OR of
 * the two independent groups is 1 - (1 - A)(1 - B) (Rausand & Hoyland, System Reliability Theory, ch. 6
 * on k-out-of-n structures and ch. 10 on proof-tested items). Averaged over the mission by the composite
 * Simpson rule on 200 000 steps (discretisation error far below the 1e-3 tolerance used).
 */
function referencePfdAvg(lambda2oo3: number, lambdaA: number, lambdaB: number, testHours: number, missionHours: number): number {
  const pfd = (t: number): number => {
    const tau = t % testHours;
    const q = 1 - Math.exp(-lambda2oo3 * tau);
    const votingGroup = 3 * q * q - 2 * q * q * q;
    const redundantPair = (1 - Math.exp(-lambdaA * tau)) * (1 - Math.exp(-lambdaB * tau));
    return 1 - (1 - votingGroup) * (1 - redundantPair);
  };
  const steps = 200_000;
  const h = missionHours / steps;
  let sum = pfd(0) + pfd(missionHours);
  for (let index = 1; index < steps; index++) sum += pfd(index * h) * (index % 2 === 1 ? 4 : 2);
  return (sum * h) / 3 / missionHours;
}

describe('the model canvas in a browser', () => {
  let browser: Browser;
  let page: Page;
  let pageErrors: string[];
  let solver: ChildProcess;

  beforeAll(async () => {
    solver = startSolverProcess();
    browser = await launchChromium();
    page = await browser.newPage({ viewport: { width: 1800, height: 1100 } });
    pageErrors = watchForPageErrors(page);
  });

  afterAll(async () => {
    await browser?.close();
    solver?.kill('SIGTERM');
  });

  it('builds a 2oo3 + 1oo2 function by dragging and connecting, solves it, and finds it saved after a reload', async () => {
    try {
      await buildSolveAndReload();
    } catch (error) {
      await screenshot(page, 'canvas-failure');
      throw error;
    }
  });

  async function buildSolveAndReload(): Promise<void> {
    await page.goto(`${inject('baseUrl')}/projects`);
    await page.waitForURL(/\/sign-in/);
    await page.getByLabel('Username').fill(ENGINEER.username);
    await page.getByLabel('Password').fill(ENGINEER.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/projects$/);
    await page.getByText(DEMO_PROJECT, { exact: true }).click();
    await page.locator('tr.mat-mdc-row', { hasText: SIF_TAG }).first().click();
    await page.locator('[data-sif-models-link]').click();
    await page.getByRole('heading', { name: `Models of ${SIF_TAG}` }).waitFor();
    await page.getByRole('button', { name: 'New fault tree' }).click();
    await page.waitForURL(/\/models\/[^/]+$/);
    await page.locator('[data-node="event:E1"]').waitFor();

    // The starter event is the top: delete it with the keyboard, undo and redo the deletion.
    await selectCard(page, 'event:E1');
    await page.keyboard.press('Delete');
    await expect.poll(() => page.locator('[data-node="event:E1"]').count()).toBe(0);
    await page.locator('f-flow').click({ position: { x: 5, y: 5 } });
    await page.keyboard.press('Control+z');
    await expect.poll(() => page.locator('[data-node="event:E1"]').count()).toBe(1);
    await page.keyboard.press('Control+Shift+z');
    await expect.poll(() => page.locator('[data-node="event:E1"]').count()).toBe(0);

    // The function: OR over a 2oo3 voting group of three transmitters and a 1oo2 pair of valves.
    await dropFromPalette(page, 'or', 520, 20);
    await dropFromPalette(page, 'atLeast', 170, 250);
    await dropFromPalette(page, 'atLeast', 880, 250);
    const eventColumns = [10, 250, 490, 770, 1010];
    for (const x of eventColumns) await dropFromPalette(page, 'rateEvent', x, 520);
    await expect.poll(() => page.locator('.card-rate, .card-gate, .card-top').count()).toBe(8);
    // The first gate of the emptied tree became its top.
    expect(await page.locator('[data-node="gate:G1"]').getAttribute('class')).toContain('card-top');
    await screenshot(page, 'canvas-01-dropped');

    await dragConnect(page, 'gate:G2', 'gate:G1');
    await dragConnect(page, 'gate:G3', 'gate:G1');
    for (const event of ['E1', 'E2', 'E3']) await dragConnect(page, `event:${event}`, 'gate:G2');
    for (const event of ['E4', 'E5']) await dragConnect(page, `event:${event}`, 'gate:G3');
    await expect.poll(() => page.locator('f-connection.link-input').count()).toBe(7);

    // Voting entered as M out of N to trip; the stored k is shown (k = N - M + 1).
    await selectCard(page, 'gate:G2');
    await page.getByLabel('M to trip').fill('2');
    await expect.poll(() => page.locator('[data-derived=k]').textContent()).toBe('2');
    await expect.poll(() => page.locator('[data-node="gate:G2"]').textContent()).toContain('fails when 2 of 3 inputs fail');
    await selectCard(page, 'gate:G3');
    await page.getByLabel('M to trip').fill('1');
    await expect.poll(() => page.locator('[data-derived=voting]').textContent()).toBe('1oo2 to trip');
    await expect.poll(() => page.locator('[data-node="gate:G3"]').textContent()).toContain('fails when 2 of 2 inputs fail');

    // A rate typed in FIT is stored per hour: 500 FIT = 5e-7 /h.
    await selectCard(page, 'event:E5');
    await page.getByRole('combobox', { name: 'Rates in' }).click();
    await page.getByRole('option', { name: 'FIT' }).click();
    await page.getByLabel('λDU, dangerous undetected').fill('500');
    await expect.poll(() => page.locator('[data-node="event:E5"]').textContent()).toContain('λDU 5.0e-7 /h');
    // An invalid entry is refused with its message and the card keeps the last valid value.
    await page.getByLabel('λDU, dangerous undetected').fill('-3');
    await expect.poll(() => page.locator('pl-event-properties mat-error').first().textContent()).toContain('λDU must be 0 or more');
    await page.getByLabel('λDU, dangerous undetected').fill('500');
    await page.locator('f-flow').click({ position: { x: 5, y: 5 } });
    await page.keyboard.press('l');
    await expect.poll(() => page.locator('[data-save-state]').textContent(), { timeout: 15_000 }).toBe('All changes saved');
    await screenshot(page, 'canvas-02-connected');

    await page.getByRole('button', { name: 'Solve' }).click();
    await expect.poll(() => page.locator('[data-solve-status]').getAttribute('data-status'), { timeout: 60_000 }).toBe('succeeded');
    await page.locator('[data-results-link]').waitFor();
    await screenshot(page, 'canvas-03-solved');

    // The number solved: PFDavg of the drawn function against the exact reference (relative tolerance 1e-3).
    const modelUrl = page.url();
    const [, projectId, modelId] = /\/projects\/([^/]+)\/sifs\/[^/]+\/models\/([^/]+)$/.exec(modelUrl)!;
    const resultsHref = (await page.locator('[data-results-link]').getAttribute('href'))!;
    const solveId = resultsHref.split('/').pop()!;
    const solved = await (await page.request.get(`${inject('baseUrl')}/api/projects/${projectId}/solves/${solveId}`)).json();
    const model = await (await page.request.get(`${inject('baseUrl')}/api/projects/${projectId}/models/${modelId}`)).json();
    const missionHours: number = model.draft.content.mission.hours;
    const expected = referencePfdAvg(1e-6, 1e-6, 5e-7, 8760, missionHours);
    expect(Math.abs(solved.result.pfdAvg - expected) / expected).toBeLessThan(1e-3);

    await page.reload();
    await page.locator('[data-node="gate:G1"]').waitFor();
    await expect.poll(() => page.locator('.card-rate, .card-gate, .card-top').count()).toBe(8);
    await expect.poll(() => page.locator('f-connection.link-input').count()).toBe(7);
    expect(await page.locator('[data-node="event:E5"]').textContent()).toContain('λDU 5.0e-7 /h');
    expect(await page.locator('[data-node="gate:G2"]').textContent()).toContain('fails when 2 of 3 inputs fail');
    expect(await page.locator('[data-save-state]').textContent()).toBe('All changes saved');
    await screenshot(page, 'canvas-04-reloaded');

    await page.locator('html').evaluate((element) => element.classList.add('theme-dark'));
    await screenshot(page, 'canvas-05-dark');

    expect(pageErrors).toEqual([]);
  }
});
