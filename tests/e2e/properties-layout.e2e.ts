import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, screenshot, watchForPageErrors } from './browser.js';
import { fieldBoxes, openNewFaultTree, overlap } from './canvas-steps.js';


describe('the properties panel layout in a browser', () => {
  let browser: Browser;
  let page: Page;
  let pageErrors: string[];

  beforeAll(async () => {
    browser = await launchChromium();
    // The narrowest window the editor is laid out for keeps the panel at its narrowest.
    page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    pageErrors = watchForPageErrors(page);
  });

  afterAll(async () => {
    await browser?.close();
  });

  it('keeps every field label clear of its unit and uncut, empty or filled, in the event, group and model forms', async () => {
    await openNewFaultTree(page, inject('baseUrl'));
    await page.locator('[data-node="event:E1"] .card-title').click();
    await page.locator('pl-properties-panel h2').filter({ hasText: 'E1' }).waitFor();
    for (const name of ['Proof tested', 'Partially tested']) {
      const box = page.getByRole('checkbox', { name });
      if (!(await box.isChecked())) await box.check();
    }
    await page.getByLabel('Partial-test interval').waitFor();

    const overlapping: string[] = [];
    const resting: string[] = [];
    /** Fills every field with a unit of the panel, then empties them, checking the layout each time. */
    const checkPanel = async (form: string, expectedFields: number): Promise<void> => {
      const inputs = page.locator('pl-properties-panel mat-form-field:has(.mat-mdc-form-field-text-suffix) input');
      const count = await inputs.count();
      expect(count, `fields with a unit in the ${form} form`).toBe(expectedFields);
      for (const [state, value] of [
        ['filled', '1'],
        ['empty', ''],
      ] as const) {
        for (let index = 0; index < count; index++) await inputs.nth(index).fill(value);
        await page.locator('pl-properties-panel h2').click();
        for (const field of await fieldBoxes(page)) {
          if (!field.floating) resting.push(`${form}, ${state}: ${field.label}`);
          if (overlap(field.labelBox, field.unitBox)) overlapping.push(`${form}, ${state}: "${field.label}" runs into "${field.unit}"`);
          if (field.cut) overlapping.push(`${form}, ${state}: "${field.label}" is cut short`);
        }
        await screenshot(page, `properties-layout-${form.replace(/\W+/g, '-')}-${state}`);
      }
    };
    // λDU, λDD, λS, restoration; proof interval, first test, coverage, duration; partial interval, coverage.
    await checkPanel('event', 10);

    await page.locator('[data-palette="ccf"]').click();
    await page.locator('pl-properties-panel h2').filter({ hasText: 'Common-cause group' }).waitFor();
    await checkPanel('common-cause group', 2);

    await page.locator('f-flow').click({ position: { x: 5, y: 5 } });
    await page.locator('pl-properties-panel h2').filter({ hasText: 'Fault tree' }).waitFor();
    await checkPanel('model', 1);

    expect(overlapping).toEqual([]);
    // A label resting on the input line shares it with the unit: every label with a unit floats above.
    expect(resting).toEqual([]);
    expect(pageErrors).toEqual([]);
  });
});
