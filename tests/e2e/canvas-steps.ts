import type { Locator, Page } from 'playwright-core';

// Steps on the model canvas shared by the browser tests (playwright's mouse, like a user's hand).

export interface Box {
  readonly x: number;
  readonly y: number;
  readonly width: number;
  readonly height: number;
}

/** Each form field of the panel that shows a unit after its input: its label's and its unit's boxes. */
export interface FieldBoxes {
  readonly label: string;
  readonly labelBox: Box;
  readonly unit: string;
  readonly unitBox: Box;
  readonly floating: boolean;
  /** Whether the label is cut short (an ellipsis in place of its end). */
  readonly cut: boolean;
}

export function overlap(a: Box, b: Box): boolean {
  return a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;
}

/** The boxes of every label and unit suffix in the properties panel, as the browser laid them out. */
export async function fieldBoxes(page: Page): Promise<FieldBoxes[]> {
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


/** Drags a palette entry onto the canvas, letting go at (x, y) relative to the canvas's top-left corner. */
export async function dropFromPalette(page: Page, kind: string, x: number, y: number): Promise<void> {
  const entry = page.locator(`[data-palette="${kind}"]`);
  const from = await box(entry);
  const flow = await box(page.locator('f-flow'));
  await page.mouse.move(from.x + 12, from.y + 12);
  await page.mouse.down();
  await page.mouse.move(from.x + 40, from.y + 30, { steps: 4 });
  await page.mouse.move(flow.x + x + 12, flow.y + y + 12, { steps: 12 });
  await page.mouse.up();
}

/** Drags from a card's output to another card's input. */
export async function dragConnect(page: Page, source: string, target: string): Promise<void> {
  const from = await box(page.locator(`[data-node="${source}"] .port-out`));
  const to = await box(page.locator(`[data-node="${target}"] .port-in`));
  await page.mouse.move(from.x + from.width / 2, from.y + from.height / 2);
  await page.mouse.down();
  await page.mouse.move(from.x + from.width / 2, from.y - 30, { steps: 4 });
  await page.mouse.move(to.x + to.width / 2, to.y + to.height / 2, { steps: 15 });
  await page.mouse.up();
}

export async function box(locator: Locator): Promise<{ x: number; y: number; width: number; height: number }> {
  await locator.waitFor();
  const found = await locator.boundingBox();
  if (!found) throw new Error(`no bounding box for ${locator.toString()}`);
  return found;
}

export async function selectCard(page: Page, node: string): Promise<void> {
  await page.locator(`[data-node="${node}"] .card-title`).click();
  await page.locator('pl-properties-panel h2').filter({ hasText: node.slice(node.indexOf(':') + 1) }).waitFor();
}


// The seeded demo workspace (server/seed/demo-workspace.ts): the demo engineer, and TZT-1310, a SIF in
// draft status of the terminal project.
const ENGINEER = { username: 'engineer', password: 'proofline-engineer' };
const DEMO_PROJECT = 'Brackwater Point Gas Terminal: export compression';
const SIF_TAG = 'TZT-1310';

/** Signs in as the demo engineer and opens a new fault tree of TZT-1310 on the canvas (its starter event E1 shown). */
export async function openNewFaultTree(page: Page, baseUrl: string): Promise<void> {
  await openNewModel(page, baseUrl, 'New fault tree');
  await page.locator('[data-node="event:E1"]').waitFor();
}

/** Signs in as the demo engineer and opens a new model of TZT-1310 from the given button of the model list. */
export async function openNewModel(page: Page, baseUrl: string, button: 'New fault tree' | 'New state model'): Promise<void> {
  await page.goto(`${baseUrl}/projects`);
  await page.waitForURL(/\/sign-in/);
  await page.getByLabel('Username').fill(ENGINEER.username);
  await page.getByLabel('Password').fill(ENGINEER.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/projects$/);
  await page.getByText(DEMO_PROJECT, { exact: true }).click();
  await page.locator('tr.mat-mdc-row', { hasText: SIF_TAG }).first().click();
  await page.locator('[data-sif-models-link]').click();
  await page.getByRole('button', { name: button }).click();
  await page.waitForURL(/\/models\/[^/]+$/);
}
