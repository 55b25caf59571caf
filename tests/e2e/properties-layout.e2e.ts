import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, screenshot, watchForPageErrors } from './browser.js';
import { openNewFaultTree } from './canvas-steps.js';


interface Box {
  readonly x: number;
  readonly y: number;
  readonly width: number;
  readonly height: number;
}

/** Each form field of the panel that shows a unit after its input: its label's and its unit's boxes. */
interface FieldBoxes {
  readonly label: string;
  readonly labelBox: Box;
  readonly unit: string;
  readonly unitBox: Box;
  readonly floating: boolean;
  /** Whether the label is cut short (an ellipsis in place of its end). */
  readonly cut: boolean;
}

function overlap(a: Box, b: Box): boolean {
  return a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
}

/** The boxes of every label and unit suffix in the properties panel, as the browser laid them out. */
async function fieldBoxes(page: Page): Promise<FieldBoxes[]> {
  return page.locator('pl-properties-panel mat-form-field').evaluateAll((fields) =>
    fields.flatMap((field) => {
      const label = field.querySelector('.mat-mdc-floating-label');
      const unit = field.querySelector('.mat-mdc-form-field-text-suffix');
      if (!label || !unit) return [];
      // The label text itself (the <label> box spans the whole field width when it rests).
      const range = document.createRange();
      range.selectNodeContents(label);
      const labelRect = range.getBoundingClientRect();
      const unitRange = document.createRange();
      unitRange.selectNodeContents(unit);
      const unitRect = unitRange.getBoundingClientRect();
      const plain = (rect: DOMRect) => ({ x: rect.x, y: rect.y, width: rect.width, height: rect.height });
      return [
        {
          label: (label.textContent ?? '').trim(),
          labelBox: plain(labelRect),
          unit: (unit.textContent ?? '').trim(),
          unitBox: plain(unitRect),
          floating: label.classList.contains('mdc-floating-label--float-above'),
          cut: label.scrollWidth > label.clientWidth + 1,
        },
      ];
    }),
  );
}

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
