import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import type { BasicEvent, RateEvent } from '../../../shared/model-file.js';
import { EventProperties } from '../canvas/properties/event-properties';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { deviceSummaryFixture, deviceVersionFixture } from './device-fixtures';
import { linkEvent } from './device-link';

const V1 = deviceVersionFixture();

@Component({
  imports: [EventProperties],
  template: `<pl-event-properties [event]="event()" [takenIds]="taken" (changed)="onChanged($event)" />`,
})
class Host {
  readonly event = signal<BasicEvent>(linkEvent({ id: 'PT-1', lambdaDU: 1e-6, mttrHours: 8, proofTest: { intervalHours: 8760 } }, V1));
  readonly taken = new Set(['PT-1']);
  readonly emitted: BasicEvent[] = [];

  onChanged(event: BasicEvent): void {
    this.emitted.push(event);
    this.event.set(event);
  }
}

describe('device link in the event properties of the canvas', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  it('shows the link, keeps it through an edit of the form, and marks the edited rate until it has a reason', async () => {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(Host);
    await settle(fixture);
    http.expectOne(`/api/devices/${V1.deviceId}/versions/1`).flush(V1);
    http.expectOne(`/api/devices/${V1.deviceId}`).flush({ ...deviceSummaryFixture(), evidence: [] });
    await settle(fixture);
    const element = fixture.nativeElement as HTMLElement;
    expect(element.querySelector('.linked-to')!.textContent).toContain('Linked to Quillfen Instruments (fictional) QP-400 pressure transmitter, version 1');

    const loader = TestbedHarnessEnvironment.loader(fixture);
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=lambdaDU]' }))).setValue('9e-8');
    await settle(fixture);
    const edited = fixture.componentInstance.emitted.at(-1) as RateEvent;
    expect(edited.lambdaDU).toBeCloseTo(9e-8, 20);
    // The form does not show the link, the device type or the SC; they stay on the event.
    expect(edited.device).toEqual({ id: V1.deviceId, version: 1 });
    expect(edited.deviceType).toBe('B');
    expect(edited.systematicCapability).toBe(2);
    expect(element.querySelector('[data-field="lambdaDU"]')!.className).toBe('state-unexplained');

    await (await loader.getHarness(MatInputHarness.with({ selector: '.reason input' }))).setValue('Sour service');
    await (await loader.getHarness(MatButtonHarness.with({ selector: '.keep' }))).click();
    await settle(fixture);
    const kept = fixture.componentInstance.emitted.at(-1) as RateEvent;
    expect(kept.device?.overrides).toEqual([{ field: 'lambdaDU', reason: 'Sour service' }]);
    expect(element.querySelector('[data-field="lambdaDU"]')!.className).toBe('state-overridden');
  }, 30_000);
});
