import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { DeviceDetail, DeviceEvidence, ImportPreview } from '../../../shared/api/devices.js';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { DeviceEditor } from './device-editor';
import { DeviceImport } from './device-import';
import { deviceFieldsFixture, deviceSummaryFixture, deviceVersionFixture } from './device-fixtures';

const RECORD: DeviceDetail = { ...deviceSummaryFixture(), evidence: [] };
const DEVICE_URL = `/api/devices/${RECORD.id}`;

const EVIDENCE: DeviceEvidence = {
  id: '5e6f7a8b-9c0d-4e1f-8a2b-3c4d5e6f7a01',
  deviceId: RECORD.id,
  deviceVersion: 1,
  fileName: 'certificate.pdf',
  contentType: 'application/pdf',
  byteSize: 2048,
  sha256: 'a'.repeat(64),
  description: 'SIL certificate (invented)',
  uploadedAt: '2026-12-02T10:00:00.000Z',
  uploadedById: RECORD.createdById,
  uploadedByDisplayName: 'Ezra Engineer (demo)',
};

/** Puts a file into the editor's file input and fires its change event, as choosing a file does. */
function choose(element: HTMLElement, file: File): void {
  const input = element.querySelector('input[type=file]') as HTMLInputElement;
  Object.defineProperty(input, 'files', { value: [file], configurable: true });
  input.dispatchEvent(new Event('change'));
}

describe('DeviceEditor: evidence uploads', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  async function open(canEdit = true) {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DeviceEditor);
    fixture.componentRef.setInput('deviceId', RECORD.id);
    await settle(fixture);
    http.expectOne('/api/devices/access').flush({ canRead: true, canEdit });
    http.expectOne(DEVICE_URL).flush(RECORD);
    http.expectOne(`${DEVICE_URL}/versions`).flush([deviceVersionFixture()]);
    http.expectOne(`${DEVICE_URL}/usage`).flush({ deviceId: RECORD.id, currentVersion: 1, entries: [] });
    await settle(fixture);
    return { fixture, element: fixture.nativeElement as HTMLElement };
  }

  it('uploads a PDF as multipart and lists it with its download link', { timeout: 30_000 }, async () => {
    const { fixture, element } = await open();
    choose(element, new File(['%PDF-1.7 invented'], 'certificate.pdf', { type: 'application/pdf' }));
    const upload = http.expectOne(`${DEVICE_URL}/evidence`);
    expect(upload.request.method).toBe('POST');
    const body = upload.request.body as FormData;
    expect((body.get('file') as File).name).toBe('certificate.pdf');
    upload.flush({ ...RECORD, evidenceCount: 1, evidence: [EVIDENCE] });
    await settle(fixture);
    const link = element.querySelector('.evidence a') as HTMLAnchorElement;
    expect(link.textContent).toBe('certificate.pdf');
    expect(link.getAttribute('href')).toBe(`${DEVICE_URL}/evidence/${EVIDENCE.id}`);
  });

  it('refuses a file over 10 MB before sending it', { timeout: 30_000 }, async () => {
    const { fixture, element } = await open();
    const big = new File(['%PDF'], 'scan.pdf', { type: 'application/pdf' });
    // 10 MiB is the limit (shared/api/devices.ts MAX_EVIDENCE_BYTES); one byte more is refused.
    Object.defineProperty(big, 'size', { value: 10 * 1024 * 1024 + 1 });
    choose(element, big);
    await settle(fixture);
    http.expectNone(`${DEVICE_URL}/evidence`);
    expect(element.querySelector('.problem')!.textContent).toContain('scan.pdf is larger than 10 MB.');
  });

  it('shows the server refusing a file of the wrong type, and keeps the record as it was', { timeout: 30_000 }, async () => {
    const { fixture, element } = await open();
    choose(element, new File(['plain text'], 'notes.pdf', { type: 'application/pdf' }));
    const message = 'file: must be a PDF, PNG or JPEG file (its content is none of these)';
    http
      .expectOne(`${DEVICE_URL}/evidence`)
      .flush({ error: { code: 'validation_failed', message, details: { issues: [{ path: 'file', message: 'must be a PDF, PNG or JPEG file (its content is none of these)' }] } } }, { status: 400, statusText: 'Bad Request' });
    await settle(fixture);
    expect(element.querySelector('.problem')!.textContent).toContain(message);
    expect(element.querySelectorAll('.evidence a')).toHaveLength(0);
  });

  it('shows no upload to a reader who may not edit', { timeout: 30_000 }, async () => {
    const { element } = await open(false);
    expect(element.querySelector('input[type=file]')).toBeNull();
  });

  it('tells a user who is not a member of any project that the record cannot be seen', { timeout: 30_000 }, async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DeviceEditor);
    fixture.componentRef.setInput('deviceId', RECORD.id);
    await settle(fixture);
    const notFound = { error: { code: 'not_found', message: 'the device library is open to project members only', details: {} } };
    http.expectOne('/api/devices/access').flush({ canRead: false, canEdit: false });
    for (const url of [DEVICE_URL, `${DEVICE_URL}/versions`, `${DEVICE_URL}/usage`]) http.expectOne(url).flush(notFound, { status: 404, statusText: 'Not Found' });
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    expect(element.querySelector('.problem')!.textContent).toContain('There is no such library record, or you may not see it.');
    expect(element.querySelector('.evidence')).toBeNull();
  });
});

describe('DeviceImport: a file read in the wrong unit', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  it('shows the unit errors of every row and allows the import once the right unit is chosen', { timeout: 30_000 }, async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DeviceImport);
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    const textarea = element.querySelector('textarea')!;
    textarea.value = 'Maker,Model,LDU\nQuillfen (fictional),QP-1,350\n';
    textarea.dispatchEvent(new Event('input'));
    await settle(fixture);
    (Array.from(element.querySelectorAll('button')).find((button) => button.textContent!.trim() === 'Preview') as HTMLButtonElement).click();
    const mapping = Object.fromEntries(['maker', 'model', 'category', 'description', 'lambdaDU', 'lambdaDD', 'lambdaSU', 'lambdaSD', 'architectureType', 'hardwareFaultTolerance', 'systematicCapability', 'proofTestCoverage', 'usefulLifeYears', 'sourceKind', 'sourceReference', 'validUntil'].map((field) => [field, null])) as ImportPreview['mapping'];
    const reply = (rateUnit: ImportPreview['rateUnit'], ok: boolean): ImportPreview => ({
      headers: ['Maker', 'Model', 'LDU'],
      mapping: { ...mapping, maker: 'Maker', model: 'Model', lambdaDU: 'LDU' },
      rateUnit,
      rows: [
        {
          line: 2,
          cells: { maker: 'Quillfen (fictional)', model: 'QP-1', lambdaDU: '350' },
          fields: ok ? deviceFieldsFixture() : null,
          outcome: ok ? 'new' : 'invalid',
          existing: null,
          duplicateOfLine: null,
          errors: ok ? [] : [{ path: 'lambdaDU', message: '350 per hour is 3.50e+2 per hour: must be at most 1e-2 per hour (is the unit right?)' }],
        },
      ],
      fileErrors: [],
      counts: { new: ok ? 1 : 0, 'new-version': 0, unchanged: 0, 'duplicate-in-file': 0, invalid: ok ? 0 : 1 },
    });
    http.expectOne('/api/devices/import/preview').flush(reply('perHour', false));
    await settle(fixture);
    expect(element.querySelector('tr[data-line="2"] .errors')!.textContent).toContain('is the unit right?');
    const importButton = () => element.querySelector('.import-button') as HTMLButtonElement;
    expect(importButton().disabled).toBe(true);

    await (await TestbedHarnessEnvironment.loader(fixture).getHarness(MatSelectHarness.with({ selector: '[aria-label="Rate unit"]' }))).clickOptions({ text: /FIT/ });
    const again = http.expectOne('/api/devices/import/preview');
    expect(again.request.body.rateUnit).toBe('fit');
    again.flush(reply('fit', true));
    await settle(fixture);
    expect(element.querySelector('tr[data-line="2"] .errors')?.textContent?.trim() ?? '').toBe('');
    expect(importButton().disabled).toBe(false);
  });
});
