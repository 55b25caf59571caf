import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { Router } from '@angular/router';
import type { DeviceDetail, DeviceUsage } from '../../../shared/api/devices.js';
import { PROJECT_ID } from '../testing/fixtures';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { deviceSummaryFixture, deviceVersionFixture } from './device-fixtures';
import { DeviceEditor } from './device-editor';
import { DeviceLibraryPage } from './device-library-page';

const RECORD: DeviceDetail = { ...deviceSummaryFixture({ version: 2 }), evidence: [] };
const DEVICE_URL = `/api/devices/${RECORD.id}`;
const SIF_ID = '2c4e6a80-1b3d-4f5a-8c7e-9d0f1a2b3c04';
const MODEL_ID = '3d5f7b91-2c4e-4a6b-9d8f-0e1a2b3c4d05';

const USAGE: DeviceUsage = {
  deviceId: RECORD.id,
  currentVersion: 2,
  entries: [
    { projectId: PROJECT_ID, projectName: 'North field (invented)', projectArchived: false, sifId: SIF_ID, sifTag: 'PZT-1101', modelId: MODEL_ID, modelName: 'Separator PT, 2oo3', place: 'draft', placeNumber: 7, eventId: 'PT-1', eventLabel: 'Transmitter A', linkedVersion: 2, overriddenFields: [] },
    { projectId: PROJECT_ID, projectName: 'North field (invented)', projectArchived: false, sifId: SIF_ID, sifTag: 'PZT-1101', modelId: MODEL_ID, modelName: 'Separator PT, 2oo3', place: 'revision', placeNumber: 1, eventId: 'PT-1', eventLabel: 'Transmitter A', linkedVersion: 1, overriddenFields: ['lambdaDU'] },
  ],
};

@Component({ template: '' })
class Page {}

describe('DeviceEditor: where the record is used, archive and delete', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  async function open(record: DeviceDetail = RECORD, usage: DeviceUsage = USAGE, canEdit = true) {
    TestBed.configureTestingModule({ providers: appTestProviders([{ path: 'devices', component: Page }]) });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DeviceEditor);
    fixture.componentRef.setInput('deviceId', record.id);
    await settle(fixture);
    http.expectOne('/api/devices/access').flush({ canRead: true, canEdit });
    http.expectOne(DEVICE_URL).flush(record);
    http.expectOne(`${DEVICE_URL}/versions`).flush([deviceVersionFixture({ version: 2 }), deviceVersionFixture()]);
    http.expectOne(`${DEVICE_URL}/usage`).flush(usage);
    await settle(fixture);
    return { fixture, loader: TestbedHarnessEnvironment.loader(fixture), element: fixture.nativeElement as HTMLElement };
  }

  it('lists the models, drafts, revisions and events that use each version, marking the older ones', { timeout: 30_000 }, async () => {
    const { element } = await open(RECORD, USAGE, false);
    const rows = Array.from(element.querySelectorAll('.usage tbody tr'));
    expect(rows.map((row) => Array.from(row.querySelectorAll('td')).map((cell) => cell.textContent!.replace(/\s+/g, ' ').trim()))).toEqual([
      ['North field (invented)', 'PZT-1101', 'Separator PT, 2oo3', 'Draft v7', 'PT-1 Transmitter A', 'v2', '–'],
      ['North field (invented)', 'PZT-1101', 'Separator PT, 2oo3', 'Rev 1', 'PT-1 Transmitter A', 'v1 older than v2', 'λDU'],
    ]);
    expect(rows[1]!.className).toContain('outdated');
    expect(rows[0]!.className).not.toContain('outdated');
    expect(rows[0]!.querySelector('a')!.getAttribute('href')).toBe(`/projects/${PROJECT_ID}/sifs/${SIF_ID}/models/${MODEL_ID}`);
    // A reader who may not edit sees no archive or delete.
    expect(element.querySelector('.archive')).toBeNull();
    expect(element.querySelector('.delete')).toBeNull();
  });

  it('archives and restores the record; while archived the figures cannot be edited', { timeout: 30_000 }, async () => {
    const { fixture, loader, element } = await open();
    await (await loader.getHarness(MatButtonHarness.with({ selector: '.archive' }))).click();
    const archive = http.expectOne(`${DEVICE_URL}/archive`);
    expect(archive.request.method).toBe('POST');
    archive.flush({ ...RECORD, archivedAt: '2026-12-02T10:00:00.000Z' });
    await settle(fixture);
    expect(element.querySelector('[data-archived]')!.textContent).toContain('Archived 2026-12-02: hidden from the library list and the pickers');
    expect(element.querySelector('[type=submit]')).toBeNull();
    expect((element.querySelector('input[name=lambdaDU]') as HTMLInputElement).closest('fieldset')!.disabled).toBe(true);

    await (await loader.getHarness(MatButtonHarness.with({ selector: '.restore' }))).click();
    http.expectOne(`${DEVICE_URL}/restore`).flush(RECORD);
    await settle(fixture);
    expect(element.querySelector('[data-archived]')).toBeNull();
    expect(element.querySelector('[type=submit]')).not.toBeNull();
  });

  it('asks before deleting, shows the refusal while models link to it, and leaves for the library once deleted', { timeout: 30_000 }, async () => {
    const { fixture, loader, element } = await open();
    await (await loader.getHarness(MatButtonHarness.with({ selector: '.delete' }))).click();
    http.expectNone(DEVICE_URL);
    const refusal = 'this record cannot be deleted while models link to it (drafts or issued revisions): "Separator PT, 2oo3" of PZT-1101; archive it instead';
    await (await loader.getHarness(MatButtonHarness.with({ selector: '.confirm-delete' }))).click();
    http.expectOne({ method: 'DELETE', url: DEVICE_URL }).flush({ error: { code: 'conflict', message: refusal, details: {} } }, { status: 409, statusText: 'Conflict' });
    await settle(fixture);
    expect(element.querySelector('.problem')!.textContent).toContain(refusal);

    await (await loader.getHarness(MatButtonHarness.with({ selector: '.delete' }))).click();
    await (await loader.getHarness(MatButtonHarness.with({ selector: '.confirm-delete' }))).click();
    http.expectOne({ method: 'DELETE', url: DEVICE_URL }).flush(null, { status: 204, statusText: 'No Content' });
    await settle(fixture);
    expect(TestBed.inject(Router).url).toBe('/devices');
  });

  it('says when no model the user may read links to the record', { timeout: 30_000 }, async () => {
    const { element } = await open(RECORD, { deviceId: RECORD.id, currentVersion: 2, entries: [] });
    expect(element.querySelector('[data-usage]')!.textContent).toContain('No model of the projects you may read links to this record.');
  });
});

describe('DeviceLibraryPage: archived records', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  it('shows active records by default and archived ones when asked, marked as archived', { timeout: 30_000 }, async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(DeviceLibraryPage);
    await settle(fixture);
    http.expectOne('/api/devices/access').flush({ canRead: true, canEdit: true });
    const first = http.expectOne((request) => request.url === '/api/devices');
    expect(first.request.params.get('archived')).toBe('active');
    first.flush([deviceSummaryFixture()]);
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    expect(element.querySelector('[data-archived]')).toBeNull();

    await (await TestbedHarnessEnvironment.loader(fixture).getHarness(MatSelectHarness.with({ selector: '[aria-label="Archived records"]' }))).clickOptions({ text: 'Archived only' });
    const second = http.expectOne((request) => request.url === '/api/devices');
    expect(second.request.params.get('archived')).toBe('archived');
    second.flush([deviceSummaryFixture({ archivedAt: '2026-12-02T10:00:00.000Z' })]);
    await settle(fixture);
    expect(element.querySelector('[data-archived]')!.textContent).toContain('archived');
  });
});
