import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, screenshot, watchForPageErrors } from './browser.js';
import { dragConnect, dropFromPalette, fieldBoxes, openNewModel, overlap } from './canvas-steps.js';

describe('test schedules of a state model in a browser', () => {
  let browser: Browser;
  let page: Page;
  let pageErrors: string[];

  beforeAll(async () => {
    browser = await launchChromium();
    page = await browser.newPage({ viewport: { width: 1280, height: 1000 } });
    pageErrors = watchForPageErrors(page);
  });

  afterAll(async () => {
    await browser?.close();
  });

  it('adds a proof test to a state model, names the faulty row as the user types, and keeps it after a reload', async () => {
    try {
      await scheduleAndReload();
    } catch (error) {
      await screenshot(page, 'test-schedules-failure');
      throw error;
    }
  });

  async function scheduleAndReload(): Promise<void> {
    await openNewModel(page, inject('baseUrl'), 'New state model');
    await page.locator('[data-node="state:OK"]').waitFor();
    await dropFromPalette(page, 'downState', 420, 40);
    await page.locator('[data-node="state:DOWN1"]').waitFor();
    await dragConnect(page, 'state:OK', 'state:DOWN1');
    await expect.poll(() => page.locator('f-connection.link-transition').count()).toBe(1);
    await page.locator('f-flow').click({ position: { x: 5, y: 5 } });
    await page.locator('pl-properties-panel h2').filter({ hasText: 'State model' }).waitFor();

    // A new schedule: once a year, the down state restored to OK with probability 1.
    await page.getByRole('button', { name: 'Add a test schedule' }).click();
    const schedule = page.locator('[data-test-schedule="main-0"]');
    await schedule.waitFor();
    expect(await schedule.getByLabel('Test interval').inputValue()).toBe('12');
    expect(await schedule.getByRole('combobox', { name: 'Row 1: from state' }).textContent()).toContain('DOWN1');
    expect(await schedule.getByRole('combobox', { name: 'Row 1: to state' }).textContent()).toContain('OK');

    // 90 % found by the test: the row out of DOWN1 no longer sums to 1, and the message says which row.
    await schedule.getByLabel('Row 1: probability').fill('0.9');
    await expect.poll(() => schedule.locator('.move-problems').textContent()).toContain('The moves out of DOWN1 (row 1) sum to 0.9, not 1');
    // The rest stays where it is: a second row DOWN1 → DOWN1 with 0.1.
    await schedule.getByRole('button', { name: 'Add a row' }).click();
    await schedule.getByRole('combobox', { name: 'Row 2: to state' }).click();
    await page.getByRole('option', { name: 'DOWN1' }).click();
    await schedule.getByLabel('Row 2: probability').fill('1.2');
    await expect.poll(() => schedule.locator('.move-problems').textContent()).toContain('Row 2: Probability must be 1 or less.');
    await schedule.getByLabel('Row 2: probability').fill('0.1');
    await expect.poll(() => schedule.locator('.move-problems').count()).toBe(0);
    await schedule.getByLabel('Test interval').fill('6');
    await expect.poll(() => schedule.locator('[data-derived=test-count]').textContent()).toContain('every 6 mo');

    // Labels stay clear of their units in the schedule's fields.
    const faults = (await fieldBoxes(page))
      .filter((field) => overlap(field.labelBox, field.unitBox) || field.cut || !field.floating)
      .map((field) => field.label);
    expect(faults).toEqual([]);
    await schedule.scrollIntoViewIfNeeded();
    await screenshot(page, 'test-schedules-01-form');

    await expect.poll(() => page.locator('[data-save-state]').textContent(), { timeout: 15_000 }).toBe('All changes saved');
    await page.reload();
    await page.locator('[data-node="state:DOWN1"]').waitFor();
    const reloaded = page.locator('[data-test-schedule="main-0"]');
    await reloaded.waitFor();
    expect(await reloaded.getByLabel('Test interval').inputValue()).toBe('6');
    expect(await reloaded.getByLabel('Row 1: probability').inputValue()).toBe('0.9');
    expect(await reloaded.getByLabel('Row 2: probability').inputValue()).toBe('0.1');
    // A complete model file: the canvas lists no problem of the model.
    expect(await page.locator('.model-issues').count()).toBe(0);
    expect(pageErrors).toEqual([]);
  }
});
