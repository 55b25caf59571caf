import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { ImportPreview } from '../../../shared/api/devices.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { DeviceImport } from './device-import';
import { deviceFieldsFixture } from './device-fixtures';

const CSV = 'Maker,Model,LDU\nQuillfen (fictional),QP-1,40\n';
const FIELDS = deviceFieldsFixture();

/** A preview as the server would send it: one row of each kind that matters here. */
function previewReply(rateUnit: ImportPreview['rateUnit'] = 'perHour'): ImportPreview {
  const mapping = { maker: 'Maker', model: 'Model', lambdaDU: 'LDU' } as Record<string, string | null>;
  for (const field of ['category', 'description', 'lambdaDD', 'lambdaSU', 'lambdaSD', 'architectureType', 'hardwareFaultTolerance', 'systematicCapability', 'proofTestCoverage', 'usefulLifeYears', 'sourceKind', 'sourceReference', 'validUntil']) {
    mapping[field] = null;
  }
  const row = { cells: { maker: 'Quillfen (fictional)', model: 'QP-1', lambdaDU: '40' }, errors: [], existing: null, duplicateOfLine: null };
  return {
    headers: ['Maker', 'Model', 'LDU'],
    mapping: mapping as ImportPreview['mapping'],
    rateUnit,
    rows: [
      { ...row, line: 2, fields: FIELDS, outcome: 'new' },
      { ...row, line: 3, cells: { ...row.cells, lambdaDU: 'abc' }, fields: null, outcome: 'invalid', errors: [{ path: 'lambdaDU', message: '"abc" is not a number' }] },
      { ...row, line: 4, fields: FIELDS, outcome: 'duplicate-in-file', duplicateOfLine: 2 },
      { ...row, line: 5, fields: FIELDS, outcome: 'new-version', existing: { id: '0b7f6d1e-4c1a-4a53-9a53-6f0f3c2b1a09', version: 3 } },
    ],
    fileErrors: [],
    counts: { new: 1, 'new-version': 1, unchanged: 0, 'duplicate-in-file': 1, invalid: 1 },
  };
}

describe('DeviceImport', () => {
  let http: HttpTestingController;

  async function open() {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DeviceImport);
    await settle(fixture);
    const loader = TestbedHarnessEnvironment.loader(fixture);
    // One input event for the whole text (as a paste does), not one per typed character.
    const textarea = (fixture.nativeElement as HTMLElement).querySelector('textarea')!;
    textarea.value = CSV;
    textarea.dispatchEvent(new Event('input'));
    await settle(fixture);
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Preview' }))).click();
    const request = http.expectOne('/api/devices/import/preview');
    expect(request.request.body).toEqual({ csv: CSV, mapping: {}, rateUnit: 'perHour' });
    request.flush(previewReply());
    await settle(fixture);
    return { fixture, loader, element: fixture.nativeElement as HTMLElement };
  }

  afterEach(() => http.verify());

  it('shows each row with its outcome, per-cell errors and duplicates, and writes nothing while rows are invalid', { timeout: 30_000 }, async () => {
    const { loader, element } = await open();
    const lines = Array.from(element.querySelectorAll('tbody tr')).map((row) => row.getAttribute('data-line'));
    expect(lines).toEqual(['2', '3', '4', '5']);
    const invalid = element.querySelector('tr[data-line="3"]')!;
    expect(invalid.textContent).toContain('Has errors');
    expect(invalid.querySelector('.errors')!.textContent).toContain('λDU: "abc" is not a number');
    expect(invalid.querySelector('.cell-error')!.textContent!.trim()).toBe('abc');
    expect(element.querySelector('tr[data-line="4"]')!.textContent!.replace(/\s+/g, ' ')).toContain('Duplicate in the file (skipped) (as line 2)');
    expect(element.querySelector('tr[data-line="5"]')!.textContent).toContain('(library v3)');
    expect(element.textContent).toContain('1 rows have errors: fix them, or skip them.');

    const importButton = await loader.getHarness(MatButtonHarness.with({ selector: '.import-button' }));
    expect(await importButton.isDisabled()).toBe(true);
    await importButton.click();
    http.expectNone('/api/devices/import/confirm');
  });

  it('imports only after confirming, skipping invalid rows and keeping existing records when asked', { timeout: 30_000 }, async () => {
    const { fixture, loader, element } = await open();
    await (await loader.getHarness(MatCheckboxHarness.with({ label: 'Skip rows with errors' }))).check();
    await (await loader.getHarness(MatCheckboxHarness.with({ label: /new versions of existing records/ }))).uncheck();
    const importButton = await loader.getHarness(MatButtonHarness.with({ selector: '.import-button' }));
    expect(await importButton.getText()).toBe('Import 1 rows');
    await importButton.click();
    const confirm = http.expectOne('/api/devices/import/confirm');
    expect(confirm.request.body).toEqual({ csv: CSV, mapping: {}, rateUnit: 'perHour', skipInvalidRows: true, existingRecords: 'skip' });
    confirm.flush({ created: 1, newVersions: 0, skipped: 3 });
    await settle(fixture);
    expect(element.textContent).toContain('Imported: 1 new records, 0 new versions; 3 rows skipped.');
  });

  it('previews again with the chosen unit and column mapping', { timeout: 30_000 }, async () => {
    const { fixture, loader } = await open();
    await (await loader.getHarness(MatSelectHarness.with({ selector: '[aria-label="Rate unit"]' }))).clickOptions({ text: /FIT/ });
    const again = http.expectOne('/api/devices/import/preview');
    expect(again.request.body.rateUnit).toBe('fit');
    again.flush(previewReply('fit'));
    await settle(fixture);

    await (await loader.getHarness(MatSelectHarness.with({ selector: '[data-field="sourceReference"]' }))).clickOptions({ text: 'Model' });
    const mapped = http.expectOne('/api/devices/import/preview');
    expect(mapped.request.body.mapping).toEqual({ sourceReference: 'Model' });
    mapped.flush(previewReply('fit'));
    await settle(fixture);
  });
});
