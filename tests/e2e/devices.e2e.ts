import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { launchChromium, newSignedOutPage, screenshot, watchForPageErrors } from './browser.js';

// The seeded demo workspace (server/seed/demo-workspace.ts): the demo engineer, and PZT-1402, a draft SIF
// of the terminal project that no other browser test uses. The device is made here, with an invented maker.
const ENGINEER = { username: 'engineer', password: 'proofline-engineer' };
const DEMO_PROJECT = 'Brackwater Point Gas Terminal: export compression';
const SIF_TAG = 'PZT-1402';

const FIELDS = {
  maker: 'Ondrevale Sensing (fictional)',
  model: 'OS-77 level switch',
  category: 'switch',
  description: '',
  lambdaDU: 1.5e-7,
  lambdaDD: 5e-8,
  lambdaSU: 2e-7,
  lambdaSD: 1e-7,
  architectureType: 'A',
  hardwareFaultTolerance: 0,
  systematicCapability: 2,
  proofTestCoverage: 0.95,
  usefulLifeYears: 12,
  sourceKind: 'generic-handbook',
  sourceReference: 'Handbook table 4.2 (invented)',
  validUntil: null,
};

async function call<T>(page: Page, method: 'get' | 'post' | 'put', path: string, data?: unknown, status = method === 'post' ? 201 : 200): Promise<T> {
  const response = await page.request[method](`${inject('baseUrl')}${path}`, data === undefined ? undefined : { data });
  expect(response.status(), `${method} ${path}: ${await response.text()}`).toBe(status);
  return (await response.json()) as T;
}

describe('a library record used by a model, in a browser', () => {
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;
  let pageErrors: string[];

  beforeAll(async () => {
    browser = await launchChromium();
    ({ context, page } = await newSignedOutPage(browser));
    // The refused delete answers 409, on purpose.
    pageErrors = watchForPageErrors(page, [409]);
  });

  afterAll(async () => {
    await context?.close();
    await browser?.close();
  });

  it('shows the canvas notice for an older version, updates all keeping the override, lists the use on the record page and refuses its deletion', async () => {
    await page.goto(`${inject('baseUrl')}/projects`);
    await page.waitForURL(/\/sign-in/);
    await page.getByLabel('Username').fill(ENGINEER.username);
    await page.getByLabel('Password').fill(ENGINEER.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/projects$/);

    const project = (await call<{ id: string; name: string }[]>(page, 'get', '/api/projects')).find((item) => item.name === DEMO_PROJECT)!;
    const sif = (await call<{ items: { id: string; tag: string }[] }>(page, 'get', `/api/projects/${project.id}/sifs?search=${SIF_TAG}&pageSize=50`)).items.find((item) => item.tag === SIF_TAG)!;
    const device = await call<{ id: string }>(page, 'post', '/api/devices', FIELDS);
    const linked = (id: string, lambdaDU: number, overrides?: object[]) => ({
      id,
      lambdaDU,
      lambdaDD: FIELDS.lambdaDD,
      lambdaS: FIELDS.lambdaSU + FIELDS.lambdaSD,
      deviceType: 'A',
      systematicCapability: 2,
      mttrHours: 8,
      proofTest: { intervalHours: 8760, coverage: 0.95 },
      device: { id: device.id, version: 1, ...(overrides ? { overrides } : {}) },
    });
    const file = {
      format: 'proofline/model',
      version: 1,
      name: 'Level switches 1oo2 (linked)',
      kind: 'fault-tree',
      mission: { hours: 87_600, demand: 'low' },
      events: [linked('LS-1', FIELDS.lambdaDU), linked('LS-2', 3e-7, [{ field: 'lambdaDU', reason: 'Fouling service (invented)' }])],
      gates: [{ id: 'LS', type: 'and', inputs: ['LS-1', 'LS-2'] }],
      top: 'LS',
    };
    const model = await call<{ id: string }>(page, 'post', `/api/projects/${project.id}/sifs/${sif.id}/models`, { file });
    await call(page, 'put', `/api/devices/${device.id}`, { ...FIELDS, lambdaDU: 1.2e-7, basedOnVersion: 1, changeNote: 'Revised handbook (invented)' });

    await page.goto(`${inject('baseUrl')}/projects/${project.id}/sifs/${sif.id}/models/${model.id}`);
    const notice = page.locator('[data-outdated-devices]');
    await expect.poll(() => notice.textContent()).toContain('2 events link to an older version');
    expect(await notice.locator('[data-event="LS-2"]').textContent()).toContain('overrides kept: λDU');
    await screenshot(page, 'devices-outdated-notice');
    await notice.getByRole('button', { name: 'Update all' }).click();
    await notice.waitFor({ state: 'detached' });
    await expect.poll(() => page.locator('[data-save-state]').textContent()).toBe('All changes saved');
    const saved = await call<{ draft: { content: { events: { id: string; lambdaDU: number; device: { version: number; overrides?: unknown[] } }[] } } }>(page, 'get', `/api/projects/${project.id}/models/${model.id}`);
    const events = saved.draft.content.events;
    // Version 2's λDU (1.2e-7 /h) reaches the linked event; the overridden one keeps 3e-7 /h and its reason.
    expect(events.map((event) => [event.id, event.device.version, event.lambdaDU])).toEqual([
      ['LS-1', 2, 1.2e-7],
      ['LS-2', 2, 3e-7],
    ]);
    expect(events[1]!.device.overrides).toEqual([{ field: 'lambdaDU', reason: 'Fouling service (invented)' }]);

    await page.goto(`${inject('baseUrl')}/devices/${device.id}`);
    const usage = page.locator('[data-usage] tbody tr');
    await expect.poll(() => usage.count()).toBe(2);
    expect(await usage.first().textContent()).toContain('Level switches 1oo2 (linked)');
    await page.getByRole('button', { name: 'Delete' }).click();
    await page.getByRole('button', { name: 'Delete for good' }).click();
    await expect.poll(() => page.locator('.problem').textContent()).toContain('cannot be deleted while models link to it');
    expect(await call<{ id: string }>(page, 'get', `/api/devices/${device.id}`)).toMatchObject({ id: device.id });
    expect(pageErrors).toEqual([]);
  });
});
