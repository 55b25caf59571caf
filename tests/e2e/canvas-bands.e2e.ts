import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, screenshot, watchForPageErrors } from './browser.js';
import { box, dragConnect, dropFromPalette, openNewFaultTree, type Box } from './canvas-steps.js';

function encloses(outer: Box, inner: Box): boolean {
  return outer.x <= inner.x && outer.y <= inner.y && outer.x + outer.width >= inner.x + inner.width && outer.y + outer.height >= inner.y + inner.height;
}

/** Whether the point lies inside the band's filled shape, as the browser hit-tests SVG geometry. */
async function bandCovers(page: Page, group: string, point: { x: number; y: number }): Promise<boolean> {
  return page.locator(`[data-band="${group}"] path.band-fill`).evaluate((path, at) => {
    const svgPath = path as SVGPathElement;
    const matrix = svgPath.getScreenCTM();
    if (!matrix) return false;
    const local = new DOMPoint(at.x, at.y).matrixTransform(matrix.inverse());
    return svgPath.isPointInFill(local);
  }, point);
}

const centreOf = (rect: Box): { x: number; y: number } => ({ x: rect.x + rect.width / 2, y: rect.y + rect.height / 2 });

describe('common-cause bands in a browser', () => {
  let browser: Browser;
  let page: Page;
  let pageErrors: string[];

  beforeAll(async () => {
    browser = await launchChromium();
    page = await browser.newPage({ viewport: { width: 1600, height: 1000 } });
    pageErrors = watchForPageErrors(page);
  });

  afterAll(async () => {
    await browser?.close();
  });

  it('wraps the group and its members in one tinted band that follows them, in light and dark', async () => {
    try {
      await wrapAndFollow();
    } catch (error) {
      await screenshot(page, 'bands-failure');
      throw error;
    }
  });

  async function wrapAndFollow(): Promise<void> {
    await openNewFaultTree(page, inject('baseUrl'));
    // The starter event E1 goes to the right first, wherever the view opened it.
    const starter = await box(page.locator('[data-node="event:E1"] .card-title'));
    const flow = await box(page.locator('f-flow'));
    await page.mouse.move(starter.x + 10, starter.y + 5);
    await page.mouse.down();
    await page.mouse.move(starter.x + 40, starter.y + 40, { steps: 5 });
    await page.mouse.move(flow.x + 860, flow.y + 480, { steps: 10 });
    await page.mouse.up();
    // Three transmitters in a row and their group below the first, left of the starter event E1, which
    // stays outside the group.
    for (const x of [20, 260, 500]) await dropFromPalette(page, 'rateEvent', x, 30);
    await dropFromPalette(page, 'ccf', 20, 470);
    await page.locator('[data-node="ccf:CCF1"]').waitFor();
    for (const event of ['E2', 'E3', 'E4']) await dragConnect(page, `event:${event}`, 'ccf:CCF1');
    await expect.poll(() => page.locator('[data-node="ccf:CCF1"]').textContent()).toContain('3 members');
    await page.locator('f-flow').click({ position: { x: 5, y: 5 } });

    const band = page.locator('[data-band="CCF1"] path.band-fill');
    await band.waitFor();
    const cards = ['event:E2', 'event:E3', 'event:E4', 'ccf:CCF1'];
    for (const card of cards) {
      const cardBox = await box(page.locator(`[data-node="${card}"]`));
      expect(encloses(await box(band), cardBox), `the band encloses ${card}`).toBe(true);
      // Every card's corners lie on the band (its pad), not only inside the band's outer box.
      for (const corner of [
        { x: cardBox.x + 2, y: cardBox.y + 2 },
        { x: cardBox.x + cardBox.width - 2, y: cardBox.y + cardBox.height - 2 },
      ]) {
        expect(await bandCovers(page, 'CCF1', corner), `the band covers the corner of ${card}`).toBe(true);
      }
    }
    // The ribbon links E2 to the group below it: the point halfway between them lies on the band.
    const first = centreOf(await box(page.locator('[data-node="event:E2"]')));
    const group = centreOf(await box(page.locator('[data-node="ccf:CCF1"]')));
    expect(await bandCovers(page, 'CCF1', { x: (first.x + group.x) / 2, y: (first.y + group.y) / 2 })).toBe(true);
    // E1 shares no cause: no band under it, and its card names no group.
    const outsider = centreOf(await box(page.locator('[data-node="event:E1"]')));
    expect(await bandCovers(page, 'CCF1', outsider)).toBe(false);
    expect(await page.locator('[data-node="event:E1"] [data-ccf-chip]').count()).toBe(0);
    expect(await page.locator('[data-node="event:E2"] [data-ccf-chip]').textContent()).toContain('common cause CCF1');
    // The band lies under the cards: a card's own centre is the card's, for the pointer and the eye.
    const middle = centreOf(await box(page.locator('[data-node="event:E3"]')));
    const topmost = await page.evaluate(({ x, y }) => document.elementFromPoint(x, y)?.closest('[data-node]')?.getAttribute('data-node'), middle);
    expect(topmost).toBe('event:E3');
    await screenshot(page, 'bands-01-light');

    // A member moved away: the band follows it once it is dropped.
    const moved = await box(page.locator('[data-node="event:E4"] .card-title'));
    await page.mouse.move(moved.x + 10, moved.y + 5);
    await page.mouse.down();
    await page.mouse.move(moved.x + 60, moved.y + 120, { steps: 6 });
    await page.mouse.move(moved.x + 120, moved.y + 260, { steps: 6 });
    await page.mouse.up();
    await expect.poll(async () => encloses(await box(band), await box(page.locator('[data-node="event:E4"]')))).toBe(true);
    expect(await bandCovers(page, 'CCF1', centreOf(await box(page.locator('[data-node="event:E4"]'))))).toBe(true);

    await page.locator('html').evaluate((element) => element.classList.add('theme-dark'));
    await screenshot(page, 'bands-02-dark');
    // The band's fill is drawn in the dark theme's colours, not the light one's.
    const fills = await page.evaluate(() => {
      const path = document.querySelector('[data-band="CCF1"] path.band-fill')!;
      const surface = getComputedStyle(document.querySelector('f-flow')!).backgroundColor;
      return { band: getComputedStyle(path).fill, surface };
    });
    expect(fills.band).not.toBe('');
    expect(luminance(fills.band)).toBeLessThan(0.25);
    await page.locator('html').evaluate((element) => element.classList.remove('theme-dark'));
    expect(luminance(await band.evaluate((path) => getComputedStyle(path).fill))).toBeGreaterThan(0.6);

    // A member taken out of the group (from the group's properties) leaves the band.
    await page.locator('[data-node="ccf:CCF1"] .card-title').click();
    await page.getByRole('button', { name: 'Remove member E4' }).click();
    await expect.poll(() => page.locator('[data-node="ccf:CCF1"]').textContent()).toContain('2 members');
    await expect.poll(async () => bandCovers(page, 'CCF1', centreOf(await box(page.locator('[data-node="event:E4"]'))))).toBe(false);
    expect(pageErrors).toEqual([]);
  }
});

/**
 * Relative luminance of a CSS colour as the browser computes it ("rgb(r, g, b)", "color(srgb r g b)" or
 * "oklab(...)" is not expected here), by the WCAG 2 formula (sRGB channels linearised).
 */
function luminance(color: string): number {
  const numbers = color.match(/[\d.]+/g)?.map(Number) ?? [];
  if (numbers.length < 3) throw new Error(`cannot read the colour ${color}`);
  const scale = color.startsWith('color(') ? 1 : 255;
  const [r, g, b] = numbers.slice(0, 3).map((value) => {
    const channel = value / scale;
    return channel <= 0.04045 ? channel / 12.92 : ((channel + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
