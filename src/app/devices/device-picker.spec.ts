import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import type { DeviceSummary } from '../../../shared/api/devices.js';
import type { RateEvent } from '../../../shared/model-file.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { formatTyped } from '../units/units';
import { deviceSummaryFixture, deviceVersionFixture } from './device-fixtures';
import { DeviceLinkPanel } from './device-link-panel';
import { DevicePicker } from './device-picker';

const DEVICE = deviceSummaryFixture();
const VALVE = deviceSummaryFixture({ id: '0b7f6d1e-4c1a-4a53-9a53-6f0f3c2b1a0a', deviceId: '0b7f6d1e-4c1a-4a53-9a53-6f0f3c2b1a0a', maker: 'Harrowmere Valveworks (fictional)', model: 'HV-200', category: 'valve' });

describe('DevicePicker', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  it('lists the library, searches as the user types, and hands over the chosen record', async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DevicePicker);
    const picked: DeviceSummary[] = [];
    fixture.componentInstance.picked.subscribe((device) => picked.push(device));
    http.expectOne('/api/devices').flush([DEVICE, VALVE]);
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    expect(element.querySelectorAll('li.result')).toHaveLength(2);
    // λDU 4e-8 /h shown as the canvas shows rates; SFF 6.6/7 = 94.3 % (one decimal).
    expect(element.querySelector(`[data-device="${DEVICE.id}"]`)!.textContent).toContain('λDU 4.0e-8 /h');
    expect(element.textContent).toContain('SFF 94.3 %');

    const loader = TestbedHarnessEnvironment.loader(fixture);
    await (await loader.getHarness(MatInputHarness.with({ selector: 'input[type=search]' }))).setValue('hv');
    const searches = http.match((request) => request.url === '/api/devices');
    expect(searches.at(-1)!.request.params.get('search')).toBe('hv');
    for (const request of searches.slice(0, -1)) request.flush([DEVICE, VALVE]);
    searches.at(-1)!.flush([VALVE]);
    await settle(fixture);
    expect(element.querySelectorAll('li.result')).toHaveLength(1);

    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label^="Use Harrowmere"]' }))).click();
    expect(picked.map((device) => device.id)).toEqual([VALVE.id]);
  });
});

describe('DeviceLinkPanel', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  const V1 = deviceVersionFixture();
  const CURRENT = deviceSummaryFixture({ version: 2, lambdaDU: 5e-8, changeNote: 'Revised report rev B' });
  /** Linked to version 1 but with λDU changed by hand and no override yet. */
  const EVENT: RateEvent = {
    id: 'PT-A',
    lambdaDU: 9e-8,
    lambdaDD: V1.lambdaDD,
    lambdaS: V1.lambdaSU + V1.lambdaSD,
    deviceType: 'B',
    systematicCapability: 2,
    proofTest: { intervalHours: 8760, coverage: 0.9 },
    device: { id: V1.deviceId, version: 1 },
  };

  async function open(event: RateEvent = EVENT) {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DeviceLinkPanel);
    fixture.componentRef.setInput('event', event);
    const emitted: RateEvent[] = [];
    fixture.componentInstance.eventChange.subscribe((next) => emitted.push(next));
    await settle(fixture);
    http.expectOne(`/api/devices/${V1.deviceId}/versions/1`).flush(V1);
    http.expectOne(`/api/devices/${V1.deviceId}`).flush({ ...CURRENT, evidence: [] });
    await settle(fixture);
    return { fixture, emitted, element: fixture.nativeElement as HTMLElement, loader: TestbedHarnessEnvironment.loader(fixture) };
  }

  it('marks linked fields, and a changed value needs a reason before it is kept as an override', async () => {
    const { fixture, emitted, element, loader } = await open();
    expect(element.querySelector('[data-field="lambdaDD"] .mark')!.textContent).toBe('linked');
    const changed = element.querySelector('[data-field="lambdaDU"]')!;
    expect(changed.className).toBe('state-unexplained');
    // The panel shows values as the properties forms do (formatTyped of units.ts).
    expect(changed.textContent).toContain(`differs from the library (${formatTyped(4e-8)})`);

    const keep = await loader.getHarness(MatButtonHarness.with({ selector: '.keep' }));
    await keep.click();
    expect(emitted).toEqual([]);
    expect(element.querySelector('.problem')!.textContent).toBe('an override of λDU needs a reason');

    await (await loader.getHarness(MatInputHarness.with({ selector: '.reason input' }))).setValue('Harsh service');
    await keep.click();
    await settle(fixture);
    expect(emitted).toHaveLength(1);
    expect(emitted[0]!.lambdaDU).toBe(9e-8);
    expect(emitted[0]!.device).toEqual({ id: V1.deviceId, version: 1, overrides: [{ field: 'lambdaDU', reason: 'Harsh service' }] });
  });

  it('shows a newer library version and updates the link to it, keeping overrides', async () => {
    const overridden: RateEvent = { ...EVENT, device: { id: V1.deviceId, version: 1, overrides: [{ field: 'lambdaDU', reason: 'Harsh service' }] } };
    const { emitted, element, loader } = await open(overridden);
    expect(element.querySelector('[data-field="lambdaDU"] .mark')!.textContent).toContain(`overridden (library ${formatTyped(4e-8)}): Harsh service`);
    expect(element.querySelector('.newer')!.textContent).toContain('Library version 2 is available (Revised report rev B)');
    await (await loader.getHarness(MatButtonHarness.with({ selector: '.update' }))).click();
    expect(emitted).toHaveLength(1);
    expect(emitted[0]!.device).toEqual({ id: V1.deviceId, version: 2, overrides: [{ field: 'lambdaDU', reason: 'Harsh service' }] });
    expect(emitted[0]!.lambdaDU).toBe(9e-8);
  });
});
