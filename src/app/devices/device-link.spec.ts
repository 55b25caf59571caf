import { describe, expect, it } from 'vitest';
import { rateEvent, type LinkedEventField, type RateEvent } from '../../../shared/model-file.js';
import { deviceVersionFixture } from './device-fixtures';
import { linkedFieldStates, type LinkedFieldStatus, linkEvent, newerVersionAvailable, overrideField, restoreField, unlinkEvent, updateLink } from './device-link';

const plainEvent: RateEvent = { id: 'PT-A', label: 'Transmitter A', lambdaDU: 1e-6, mttrHours: 8, proofTest: { intervalHours: 8760 } };
const v1 = deviceVersionFixture();
const v2 = deviceVersionFixture({ version: 2, lambdaDU: 5e-8, lambdaSU: 2e-7, systematicCapability: 3 });

function statusOf(event: RateEvent, version = v1): Partial<Record<LinkedEventField, LinkedFieldStatus>> {
  return Object.fromEntries(linkedFieldStates(event, version).map((state) => [state.field, state.status]));
}

describe('device links', () => {
  it('fills the rates from the library (λS = λSU + λSD) and keeps the event its own id, label, MTTR and test interval', () => {
    const linked = linkEvent(plainEvent, v1);
    expect(rateEvent.safeParse(linked).success).toBe(true);
    expect(linked).toMatchObject({ id: 'PT-A', label: 'Transmitter A', mttrHours: 8, lambdaDU: 4e-8, lambdaDD: 3.6e-7, deviceType: 'B', systematicCapability: 2 });
    // 1e-7 + 2e-7 = 3e-7 per hour; tolerance 1e-20 (floating-point sum).
    expect(linked.lambdaS).toBeCloseTo(3e-7, 20);
    expect(linked.proofTest).toEqual({ intervalHours: 8760, coverage: 0.9 });
    expect(linked.device).toEqual({ id: v1.deviceId, version: 1 });
    expect(linked.source).toContain('library version 1: QF-2026-014 (invented)');
    expect(Object.values(statusOf(linked))).toEqual(['linked', 'linked', 'linked', 'linked', 'linked', 'linked']);
  });

  it('marks an edited linked value as unexplained until it is an override with a reason', () => {
    const linked = linkEvent(plainEvent, v1);
    expect(statusOf({ ...linked, lambdaDU: 9e-8 }).lambdaDU).toBe('unexplained');

    const refused = overrideField(linked, 'lambdaDU', 9e-8, '   ');
    expect(refused).toEqual({ ok: false, message: 'an override of λDU needs a reason' });

    const changed = overrideField(linked, 'lambdaDU', 9e-8, 'Harsh service: site doubles λDU');
    if (!changed.ok) throw new Error(changed.message);
    expect(changed.event.lambdaDU).toBe(9e-8);
    expect(changed.event.device?.overrides).toEqual([{ field: 'lambdaDU', reason: 'Harsh service: site doubles λDU' }]);
    expect(statusOf(changed.event).lambdaDU).toBe('overridden');
    expect(rateEvent.safeParse(changed.event).success).toBe(true);

    const restored = restoreField(changed.event, 'lambdaDU', v1);
    expect(restored.lambdaDU).toBe(4e-8);
    expect(restored.device).toEqual({ id: v1.deviceId, version: 1 });
  });

  it('offers a newer version and updates only the fields without an override', () => {
    const changed = overrideField(linkEvent(plainEvent, v1), 'systematicCapability', 1, 'No prior use at this site yet');
    if (!changed.ok) throw new Error(changed.message);
    expect(newerVersionAvailable(changed.event.device, v1)).toBe(false);
    expect(newerVersionAvailable(changed.event.device, v2)).toBe(true);
    expect(newerVersionAvailable(changed.event.device, { ...v2, deviceId: 'other' })).toBe(false);

    const updated = updateLink(changed.event, v2);
    expect(updated.device).toEqual({ id: v1.deviceId, version: 2, overrides: [{ field: 'systematicCapability', reason: 'No prior use at this site yet' }] });
    expect(updated.lambdaDU).toBe(5e-8);
    expect(updated.lambdaS).toBeCloseTo(4e-7, 20);
    expect(updated.systematicCapability).toBe(1);
    expect(statusOf(updated, v2)).toMatchObject({ lambdaDU: 'linked', systematicCapability: 'overridden' });
    // Against the old version, the new figures show as differing: the link, not the values, says which applies.
    expect(statusOf(updated, v1).lambdaDU).toBe('unexplained');
  });

  it('leaves proof-test coverage out of an event without a proof test, and unlinking keeps the values', () => {
    const noTest: RateEvent = { id: 'RLY-1', lambdaDU: 1e-7 };
    const linked = linkEvent(noTest, v1);
    expect(linked.proofTest).toBeUndefined();
    expect(linkedFieldStates(linked, v1).map((state) => state.field)).not.toContain('proofTest.coverage');
    const unlinked = unlinkEvent(linked);
    expect(unlinked.device).toBeUndefined();
    expect(unlinked.lambdaDU).toBe(4e-8);
  });
});
