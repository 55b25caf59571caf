import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { formatTyped } from '../units/units';
import { deviceSummaryFixture, deviceVersionFixture } from './device-fixtures';
import { DeviceEditor } from './device-editor';
import { DeviceLibraryPage } from './device-library-page';

const RECORD = { ...deviceSummaryFixture(), evidence: [] };
const DEVICE_URL = `/api/devices/${RECORD.id}`;

describe('DeviceEditor', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  async function open() {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DeviceEditor);
    fixture.componentRef.setInput('deviceId', RECORD.id);
    await settle(fixture);
    http.expectOne('/api/devices/access').flush({ canRead: true, canEdit: true });
    http.expectOne(DEVICE_URL).flush(RECORD);
    http.expectOne(`${DEVICE_URL}/versions`).flush([deviceVersionFixture()]);
    http.expectOne(`${DEVICE_URL}/usage`).flush({ deviceId: RECORD.id, currentVersion: 1, entries: [] });
    await settle(fixture);
    return { fixture, loader: TestbedHarnessEnvironment.loader(fixture), element: fixture.nativeElement as HTMLElement };
  }

  it('shows rates in FIT, saves an edit as the next version in per-hour units, and needs a change note', { timeout: 30_000 }, async () => {
    const { fixture, loader, element } = await open();
    const lambdaDU = await loader.getHarness(MatInputHarness.with({ selector: '[name=lambdaDU]' }));
    // 4e-8 per hour = 40 FIT (1 FIT = 1e-9 per hour, common practice).
    expect(await lambdaDU.getValue()).toBe('40');
    // DC = 360 / 400 = 90.0 %, SFF = 660 / 700 = 94.3 % (IEC 61508-2 Annex C).
    expect(element.textContent).toContain('Diagnostic coverage 90.0 %');
    expect(element.textContent).toContain('safe failure fraction 94.3 %');

    await lambdaDU.setValue('50');
    const save = await loader.getHarness(MatButtonHarness.with({ text: 'Save as version 2' }));
    await save.click();
    http.expectNone(DEVICE_URL);
    expect(element.textContent).toContain('say what changed and why');

    await (await loader.getHarness(MatInputHarness.with({ selector: '[name=changeNote]' }))).setValue('Report rev B');
    await save.click();
    const put = http.expectOne(DEVICE_URL);
    expect(put.request.method).toBe('PUT');
    expect(put.request.body.basedOnVersion).toBe(1);
    expect(put.request.body.changeNote).toBe('Report rev B');
    // 50 FIT = 5e-8 per hour; tolerance 1e-20.
    expect(put.request.body.lambdaDU).toBeCloseTo(5e-8, 20);
    put.flush({ ...RECORD, version: 2, lambdaDU: 5e-8 });
    await settle(fixture);
    await settle(fixture);
    expect(element.querySelector('.problem')).toBeNull();
    http.expectOne(`${DEVICE_URL}/versions`).flush([deviceVersionFixture({ version: 2, lambdaDU: 5e-8 }), deviceVersionFixture()]);
    await settle(fixture);
    expect(element.querySelectorAll('.versions tbody tr')).toHaveLength(2);
  });

  it('keeps the typed figures when someone saved a newer version first', { timeout: 30_000 }, async () => {
    const { fixture, loader, element } = await open();
    await (await loader.getHarness(MatSelectHarness.with({ selector: '[aria-label="Rate unit"]' }))).clickOptions({ text: 'per hour' });
    const lambdaDU = await loader.getHarness(MatInputHarness.with({ selector: '[name=lambdaDU]' }));
    expect(await lambdaDU.getValue()).toBe(formatTyped(4e-8));
    await lambdaDU.setValue('7e-8');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[name=changeNote]' }))).setValue('Field data');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save as version 2' }))).click();
    http
      .expectOne(DEVICE_URL)
      .flush(
        { error: { code: 'version_conflict', message: 'this record is at version 2, not 1', details: { current: { ...RECORD, version: 2 } } } },
        { status: 409, statusText: 'Conflict' },
      );
    await settle(fixture);
    http.expectOne(`${DEVICE_URL}/versions`).flush([deviceVersionFixture({ version: 2 }), deviceVersionFixture()]);
    await settle(fixture);
    expect(element.querySelector('.problem')!.textContent).toContain('this record is at version 2, not 1');
    expect(await lambdaDU.getValue()).toBe('7e-8');
    expect(await (await loader.getHarness(MatButtonHarness.with({ selector: '[type=submit]' }))).getText()).toBe('Save as version 3');
  });
});

describe('DeviceLibraryPage', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  it('lists the records with rates in the chosen unit and hides import for a reader who may not edit', async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DeviceLibraryPage);
    await settle(fixture);
    http.expectOne('/api/devices/access').flush({ canRead: true, canEdit: false });
    http.expectOne((request) => request.url === '/api/devices').flush([deviceSummaryFixture()]);
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    const cells = Array.from(element.querySelectorAll('tbody td')).map((cell) => cell.textContent!.trim());
    // Default unit FIT: 4e-8 /h = 40 FIT, 3.6e-7 /h = 360 FIT.
    expect(cells.slice(0, 5)).toEqual(['Quillfen Instruments (fictional)', 'QP-400 pressure transmitter', 'Transmitter', '40', '360']);
    expect(element.textContent).not.toContain('Import CSV');
    expect(element.textContent).toContain('Export CSV');
  });
});
