import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { HttpTestingController } from '@angular/common/http/testing';
import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import type { RateEvent } from '../../../shared/model-file.js';
import type { EditableModel, FaultTreeDraft } from '../canvas/model-graph';
import { appTestProviders, settle } from '../testing/app-test-providers';
import { deviceSummaryFixture, deviceVersionFixture } from './device-fixtures';
import { linkEvent, overrideField } from './device-link';
import { OutdatedDevicesNotice } from './outdated-devices-notice';

const V1 = deviceVersionFixture();

function rateEvents(model: EditableModel): readonly RateEvent[] {
  return (model as FaultTreeDraft).events as readonly RateEvent[];
}
const V2 = deviceSummaryFixture({ version: 2, lambdaDU: 8e-8, changeNote: 'New field data (invented)' });

function linkedModel(): EditableModel {
  const pt2 = overrideField(linkEvent({ id: 'PT-2', label: 'Transmitter B', lambdaDU: 0, mttrHours: 8 }, V1), 'lambdaDU', 1e-7, 'Sour service (invented)');
  if (!pt2.ok) throw new Error(pt2.message);
  return {
    format: 'proofline/model',
    version: 1,
    name: 'Two transmitters',
    kind: 'fault-tree',
    mission: { hours: 87_600, demand: 'low' },
    events: [linkEvent({ id: 'PT-1', label: 'Transmitter A', lambdaDU: 0, mttrHours: 8 }, V1), pt2.event],
    gates: [{ id: 'TOP', type: 'and', inputs: ['PT-1', 'PT-2'] }],
    top: 'TOP',
  };
}

@Component({
  imports: [OutdatedDevicesNotice],
  template: `<pl-outdated-devices-notice [model]="model()" [readOnly]="readOnly()" (edit)="onEdit($event)" />`,
})
class Host {
  readonly model = signal<EditableModel>(linkedModel());
  readonly readOnly = signal(false);
  readonly edits: EditableModel[] = [];

  onEdit(model: EditableModel): void {
    this.edits.push(model);
    this.model.set(model);
  }
}

describe('OutdatedDevicesNotice', () => {
  let http: HttpTestingController;
  afterEach(() => http.verify());

  async function open() {
    TestBed.configureTestingModule({ providers: appTestProviders() });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(Host);
    await settle(fixture);
    const lookup = http.expectOne((request) => request.url === '/api/devices');
    // The records the model links to are looked up by id, archived ones included.
    expect(lookup.request.params.get('ids')).toBe(V1.deviceId);
    expect(lookup.request.params.get('archived')).toBe('all');
    lookup.flush([V2]);
    await settle(fixture);
    return { fixture, element: fixture.nativeElement as HTMLElement, loader: TestbedHarnessEnvironment.loader(fixture) };
  }

  it('lists the events on an older version and updates one, keeping its override and reason', { timeout: 30_000 }, async () => {
    const { fixture, element, loader } = await open();
    const notice = element.querySelector('[data-outdated-devices]')!;
    expect(notice.textContent).toContain('2 events link to an older version');
    expect(notice.querySelector('[data-event="PT-1"]')!.textContent).toContain('QP-400 pressure transmitter v1 → v2');
    expect(notice.querySelector('[data-event="PT-2"]')!.textContent).toContain('overrides kept: λDU');

    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Update PT-2 to version 2"]' }))).click();
    await settle(fixture);
    const after = { events: rateEvents(fixture.componentInstance.edits.at(-1)!) };
    expect(after.events[1]).toMatchObject({ lambdaDU: 1e-7, device: { version: 2, overrides: [{ field: 'lambdaDU', reason: 'Sour service (invented)' }] } });
    expect(after.events[0]!.device?.version).toBe(1);
    expect(element.querySelector('[data-outdated-devices]')!.textContent).toContain('1 event links');
    // The set of linked records did not change: nothing is read again.
    http.expectNone((request) => request.url === '/api/devices');
  });

  it('updates all in one edit, and shows no buttons to a reader', { timeout: 30_000 }, async () => {
    const { fixture, element, loader } = await open();
    fixture.componentInstance.readOnly.set(true);
    await settle(fixture);
    expect(await loader.getAllHarnesses(MatButtonHarness)).toHaveLength(0);
    expect(element.querySelector('[data-outdated-devices]')).not.toBeNull();

    fixture.componentInstance.readOnly.set(false);
    await settle(fixture);
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Update all' }))).click();
    await settle(fixture);
    expect(fixture.componentInstance.edits).toHaveLength(1);
    const events = rateEvents(fixture.componentInstance.edits[0]!);
    // λDU of v2 is 8e-8 /h; the overridden λDU of PT-2 stays 1e-7 /h.
    expect(events.map((event) => [event.device?.version, event.lambdaDU])).toEqual([
      [2, 8e-8],
      [2, 1e-7],
    ]);
    expect(element.querySelector('[data-outdated-devices]')).toBeNull();
  });
});
