import { describe, expect, it } from 'vitest';
import type { RateEvent } from '../../../shared/model-file.js';
import type { EditableModel, FaultTreeDraft } from '../canvas/model-graph';
import { deviceSummaryFixture, deviceVersionFixture } from './device-fixtures';
import { linkEvent, overrideField } from './device-link';
import { linkedDeviceIds, outdatedEvents, updateOutdated } from './outdated-links';

const V1 = deviceVersionFixture();

function rateEvents(model: EditableModel): readonly RateEvent[] {
  return (model as FaultTreeDraft).events as readonly RateEvent[];
}
const V2 = deviceSummaryFixture({ version: 2, lambdaDU: 8e-8, lambdaDD: 3.2e-7, changeNote: 'New field data (invented)' });
const VALVE = deviceSummaryFixture({ deviceId: '0b7f6d1e-4c1a-4a53-9a53-6f0f3c2b1a09', id: '0b7f6d1e-4c1a-4a53-9a53-6f0f3c2b1a09', model: 'HV-20 valve', version: 1 });

function model(): EditableModel {
  const overridden = overrideField(linkEvent({ id: 'PT-2', lambdaDU: 0, mttrHours: 8, proofTest: { intervalHours: 8760 } }, V1), 'lambdaDU', 1e-7, 'Sour service (invented)');
  if (!overridden.ok) throw new Error(overridden.message);
  return {
    format: 'proofline/model',
    version: 1,
    name: 'Two transmitters and a valve',
    kind: 'fault-tree',
    mission: { hours: 87_600, demand: 'low' },
    events: [
      linkEvent({ id: 'PT-1', lambdaDU: 0, mttrHours: 8, proofTest: { intervalHours: 8760 } }, V1),
      overridden.event,
      linkEvent({ id: 'XV-1', lambdaDU: 0 }, { ...VALVE, deviceId: VALVE.id }),
      { id: 'HUMAN', probability: 0.01 },
    ],
    gates: [{ id: 'TOP', type: 'or', inputs: ['PT-1', 'PT-2', 'XV-1', 'HUMAN'] }],
    top: 'TOP',
  };
}

const currents = new Map([
  [V2.id, V2],
  [VALVE.id, VALVE],
]);

describe('events on an older library version', () => {
  it('names the linked records once and finds the events whose record has moved on', () => {
    expect(linkedDeviceIds(model())).toEqual([V1.deviceId, VALVE.id].sort());
    const outdated = outdatedEvents(model(), currents);
    expect(outdated.map((item) => [item.eventId, item.linkedVersion, item.current.version, item.overriddenFields])).toEqual([
      ['PT-1', 1, 2, []],
      ['PT-2', 1, 2, ['lambdaDU']],
    ]);
    // A record not read yet is not reported as outdated.
    expect(outdatedEvents(model(), new Map())).toEqual([]);
  });

  it('updates all: the linked fields take version 2, an override keeps its value and reason', () => {
    const updated = updateOutdated(model(), currents);
    const events = new Map(rateEvents(updated).map((event) => [event.id, event]));
    expect(events.get('PT-1')).toMatchObject({ lambdaDU: 8e-8, lambdaDD: 3.2e-7, device: { id: V2.id, version: 2 } });
    expect(events.get('PT-2')).toMatchObject({ lambdaDU: 1e-7, lambdaDD: 3.2e-7, device: { id: V2.id, version: 2, overrides: [{ field: 'lambdaDU', reason: 'Sour service (invented)' }] } });
    expect(events.get('XV-1')?.device?.version).toBe(1);
    expect(outdatedEvents(updated, currents)).toEqual([]);
  });

  it('updates one event and leaves the others on their version', () => {
    const updated = updateOutdated(model(), currents, ['PT-2']);
    expect(outdatedEvents(updated, currents).map((item) => item.eventId)).toEqual(['PT-1']);
    expect(updateOutdated(updated, currents, ['XV-1'])).toBe(updated);
  });
});
