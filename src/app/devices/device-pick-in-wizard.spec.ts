import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { Router } from '@angular/router';
import type { ModelDetail } from '../../../shared/api/models.js';
import type { BasicEvent, FaultTreeModel, RateEvent } from '../../../shared/model-file.js';
import { EventProperties } from '../canvas/properties/event-properties';
import { OWNER_ID, PROJECT_ID, aSif } from '../testing/fixtures';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { ArchitectureWizard } from '../wizard/architecture-wizard';
import { deviceSummaryFixture, deviceVersionFixture } from './device-fixtures';

const MODEL_ID = '7a1c2e3d-4b5a-4c6d-8e7f-901a2b3c4d05';
const REASON = 'Site records show a higher rate in this service (invented)';

@Component({ template: '' })
class ModelPage {}

/** The reply of POST .../models: the file as the new model's draft (a valid modelDetail). */
function createdModel(file: FaultTreeModel, sifId: string): ModelDetail {
  const at = '2026-12-02T09:00:00.000Z';
  return {
    id: MODEL_ID,
    projectId: PROJECT_ID,
    sifId,
    name: file.name,
    kind: 'fault-tree',
    draftVersion: 1,
    latestRevision: null,
    createdAt: at,
    createdById: OWNER_ID,
    updatedAt: at,
    draft: { version: 1, content: file as unknown as Record<string, unknown>, issues: [], updatedAt: at, updatedById: OWNER_ID, updatedByDisplayName: 'Olive Owner (demo)' },
  };
}

@Component({
  imports: [EventProperties],
  template: `<pl-event-properties [event]="event()" [takenIds]="taken" (changed)="event.set($event)" />`,
})
class PropertiesHost {
  readonly event = signal<BasicEvent>({ id: 'none', lambdaDU: 0 });
  readonly taken = new Set<string>();
}

describe('device library in the architecture wizard', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  it('links the picked device in the generated fault tree as the canvas does, an edited figure kept as an override with its reason', async () => {
    const sif = aSif();
    const modelPath = `projects/${PROJECT_ID}/sifs/${sif.id}/models/${MODEL_ID}`;
    TestBed.configureTestingModule({ providers: appTestProviders([{ path: 'projects/:projectId/sifs/:sifId/models/:modelId', component: ModelPage }]) });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(ArchitectureWizard);
    fixture.componentRef.setInput('projectId', PROJECT_ID);
    fixture.componentRef.setInput('sifId', sif.id);
    await settle(fixture);
    http.expectOne(`/api/projects/${PROJECT_ID}/sifs/${sif.id}`).flush(sif);
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const documentLoader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    const inputs = (name: string) => loader.getAllHarnesses(MatInputHarness.with({ selector: `[formControlName=${name}]` }));

    await (await loader.getAllHarnesses(MatButtonHarness.with({ selector: '.pick-device' })))[0]!.click();
    await settle(fixture);
    const library = deviceSummaryFixture();
    http.expectOne('/api/devices').flush([library]);
    await settle(fixture);
    await (await documentLoader.getHarness(MatButtonHarness.with({ selector: '[aria-label^="Use Quillfen"]' }))).click();
    await settle(fixture);

    const sensors = element.querySelector('[data-subsystem="0"]')!;
    expect(sensors.querySelector('[data-linked-device]')!.textContent).toContain('Linked to Quillfen Instruments (fictional) QP-400 pressure transmitter, library version 1');
    expect(element.querySelectorAll('[data-linked-device]')).toHaveLength(1);
    // Shown in FIT: 4e-8 /h = 40 FIT, 3.6e-7 /h = 360 FIT (1 FIT = 1e-9 /h, common practice); coverage 0.9 = 90 %.
    expect(await (await inputs('lambdaDU'))[0]!.getValue()).toBe('40');
    expect(await (await inputs('lambdaDD'))[0]!.getValue()).toBe('360');
    expect(await (await inputs('proofCoverage'))[0]!.getValue()).toBe('90');
    expect(sensors.querySelector('[data-overrides]')).toBeNull();

    // The other subsystems are typed in; λDU is required there.
    await (await inputs('lambdaDU'))[1]!.setValue('20');
    await (await inputs('lambdaDU'))[2]!.setValue('500');
    await (await inputs('lambdaDU'))[0]!.setValue('50');
    await settle(fixture);
    expect(sensors.querySelector('[data-overrides]')!.textContent).toContain('λDU (library 40 FIT)');

    const write = await loader.getHarness(MatButtonHarness.with({ text: 'Write the model' }));
    await write.click();
    await settle(fixture);
    http.expectNone((request) => request.method === 'POST');
    expect(element.querySelector('.problems')!.textContent).toContain('Subsystem 1: λDU (library 40 FIT) differs from Quillfen Instruments (fictional) QP-400 pressure transmitter version 1; give the reason');

    await (await inputs('overrideReason'))[0]!.setValue(REASON);
    await write.click();
    await settle(fixture);
    const create = http.expectOne({ method: 'POST', url: `/api/projects/${PROJECT_ID}/sifs/${sif.id}/models` });
    const file = (create.request.body as { file: FaultTreeModel }).file;
    const events = new Map(file.events.map((event) => [event.id, event as RateEvent]));
    for (const id of ['PT-1', 'PT-2']) {
      const event = events.get(id)!;
      expect(event.device).toEqual({ id: library.id, version: 1, overrides: [{ field: 'lambdaDU', reason: REASON }] });
      // The override keeps the typed 50 FIT = 5e-8 /h (relative tolerance 1e-12); the linked fields hold the library's values.
      expect(Math.abs(event.lambdaDU - 5e-8)).toBeLessThan(5e-20);
      expect(event.lambdaDD).toBe(3.6e-7);
      // λS = λSU + λSD = 1e-7 + 2e-7 /h (docs/model-format.md, linked fields), to 1e-20 /h.
      expect(Math.abs(event.lambdaS! - 3e-7)).toBeLessThan(1e-20);
      expect(event.deviceType).toBe('B');
      expect(event.systematicCapability).toBe(2);
      expect(event.proofTest?.coverage).toBe(0.9);
      expect(event.source).toContain('library version 1');
    }
    for (const id of ['LS-1', 'XV-1', 'XV-2']) expect(events.get(id)!.device).toBeUndefined();
    create.flush(createdModel(file, sif.id));
    await settle(fixture);
    expect(TestBed.inject(Router).url).toBe(`/${modelPath}`);

    // The generated event opens on the canvas as linked, its λDU marked as overridden with the reason.
    const host = TestBed.createComponent(PropertiesHost);
    host.componentInstance.event.set(events.get('PT-1')!);
    await settle(host);
    http.expectOne(`/api/devices/${library.id}/versions/1`).flush(deviceVersionFixture());
    http.expectOne(`/api/devices/${library.id}`).flush({ ...library, evidence: [] });
    await settle(host);
    const panel = host.nativeElement as HTMLElement;
    expect(panel.querySelector('.linked-to')!.textContent).toContain('Linked to Quillfen Instruments (fictional) QP-400 pressure transmitter, version 1');
    expect(panel.querySelector('[data-field="lambdaDU"]')!.className).toBe('state-overridden');
    expect(panel.querySelector('[data-field="lambdaDU"]')!.textContent).toContain(REASON);
    expect(panel.querySelector('[data-field="lambdaDD"]')!.className).toBe('state-linked');
    expect(panel.querySelector('[data-field="proofTest.coverage"]')!.className).toBe('state-linked');
  }, 60_000);

  it('unlinks on request: the typed figures stay and the events carry no link', async () => {
    const sif = aSif();
    TestBed.configureTestingModule({ providers: appTestProviders([{ path: 'projects/:projectId/sifs/:sifId/models/:modelId', component: ModelPage }]) });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(ArchitectureWizard);
    fixture.componentRef.setInput('projectId', PROJECT_ID);
    fixture.componentRef.setInput('sifId', sif.id);
    await settle(fixture);
    http.expectOne(`/api/projects/${PROJECT_ID}/sifs/${sif.id}`).flush(sif);
    await settle(fixture);
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const documentLoader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    const inputs = (name: string) => loader.getAllHarnesses(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
    await (await loader.getAllHarnesses(MatButtonHarness.with({ selector: '.pick-device' })))[0]!.click();
    await settle(fixture);
    http.expectOne('/api/devices').flush([deviceSummaryFixture()]);
    await settle(fixture);
    await (await documentLoader.getHarness(MatButtonHarness.with({ selector: '[aria-label^="Use Quillfen"]' }))).click();
    await settle(fixture);
    await (await loader.getHarness(MatButtonHarness.with({ selector: '.unlink-device' }))).click();
    await settle(fixture);
    expect((fixture.nativeElement as HTMLElement).querySelector('[data-linked-device]')).toBeNull();
    await (await inputs('lambdaDU'))[1]!.setValue('20');
    await (await inputs('lambdaDU'))[2]!.setValue('500');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Write the model' }))).click();
    await settle(fixture);
    const create = http.expectOne({ method: 'POST', url: `/api/projects/${PROJECT_ID}/sifs/${sif.id}/models` });
    const file = (create.request.body as { file: FaultTreeModel }).file;
    const sensor = file.events.find((event) => event.id === 'PT-1') as RateEvent;
    expect(sensor.device).toBeUndefined();
    // 40 FIT as filled in = 4e-8 /h (1 FIT = 1e-9 /h, common practice), relative tolerance 1e-12.
    expect(Math.abs(sensor.lambdaDU - 4e-8)).toBeLessThan(4e-20);
    expect(sensor.label).toBe('Quillfen Instruments (fictional) QP-400 pressure transmitter');
    create.flush(createdModel(file, sif.id));
    await settle(fixture);
  }, 60_000);
});
