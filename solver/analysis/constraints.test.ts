import { describe, expect, it } from 'vitest';
import type { FaultTreeModel } from '../../shared/model-file.js';
import { architecturalConstraints, iec61511MaxSil, iec61511MinimumHft, route1HMaxSil, safeFailureFraction, silClaim } from './constraints.js';
import { smallestCutOrder, subsystemsOf } from './structure.js';

/** Sensors 2oo3 (fail at 2 of 3), one logic solver, two valves 1oo2 (fail when both fail), in series. */
function demoTree(overrides: { deviceType?: 'A' | 'B'; sc?: number } = {}): FaultTreeModel {
  const sensor = (id: string) => ({ id, lambdaDU: 5e-7, lambdaDD: 1.5e-6, lambdaS: 2e-6, mttrHours: 8, deviceType: 'B' as const, systematicCapability: 3, proofTest: { intervalHours: 8760 } });
  const valve = (id: string) => ({ id, lambdaDU: 2e-6, lambdaS: 1e-6, mttrHours: 24, deviceType: overrides.deviceType ?? ('A' as const), systematicCapability: overrides.sc ?? 3, proofTest: { intervalHours: 8760 } });
  return {
    format: 'proofline/model',
    version: 1,
    name: 'analysis test',
    mission: { hours: 87_600, demand: 'low' },
    kind: 'fault-tree',
    events: [sensor('PT-1'), sensor('PT-2'), sensor('PT-3'), { id: 'LS', lambdaDU: 1e-8, lambdaDD: 9.9e-7, lambdaS: 1e-6, mttrHours: 8, deviceType: 'B', systematicCapability: 3 }, valve('XV-1'), valve('XV-2')],
    gates: [
      { id: 'TOP', type: 'or', inputs: ['SENSORS', 'LS', 'VALVES'] },
      { id: 'SENSORS', type: 'atLeast', k: 2, inputs: ['PT-1', 'PT-2', 'PT-3'] },
      { id: 'VALVES', type: 'and', inputs: ['XV-1', 'XV-2'] },
    ],
    ccf: [{ id: 'CCF-PT', members: ['PT-1', 'PT-2', 'PT-3'], beta: 0.05, model: 'beta' }],
    top: 'TOP',
  };
}

describe('Route 1H, IEC 61508-2:2010 Tables 2 and 3 (from memory)', () => {
  it('type A: SFF < 60 % gives SIL 1 / 2 / 3 at HFT 0 / 1 / 2', () => {
    expect([0, 1, 2].map((hft) => route1HMaxSil('A', 0.5, hft))).toEqual([1, 2, 3]);
  });
  it('type B: SFF < 60 % at HFT 0 is not allowed; the 60 % lower bound is inclusive', () => {
    expect(route1HMaxSil('B', 0.5999, 0)).toBeNull();
    expect(route1HMaxSil('B', 0.6, 0)).toBe(1);
    expect(route1HMaxSil('B', 0.8999, 1)).toBe(2);
    expect(route1HMaxSil('B', 0.9, 1)).toBe(3);
    expect(route1HMaxSil('B', 0.99, 0)).toBe(3);
    expect(route1HMaxSil('B', 0.99, 2)).toBe(4);
  });
  it('HFT above 2 reads the HFT 2 column', () => {
    expect(route1HMaxSil('B', 0.7, 3)).toBe(route1HMaxSil('B', 0.7, 2));
  });
});

describe('minimum HFT, IEC 61511-1:2016 11.4.5 Table 6 (from memory)', () => {
  it('SIL 1: 0; SIL 2: 0 in low demand, 1 otherwise; SIL 3: 1; SIL 4: 2', () => {
    expect([1, 2, 3, 4].map((sil) => iec61511MinimumHft(sil as 1, 'low'))).toEqual([0, 0, 1, 2]);
    expect([1, 2, 3, 4].map((sil) => iec61511MinimumHft(sil as 1, 'high'))).toEqual([0, 1, 1, 2]);
  });
  it('the highest SIL an HFT allows follows from the table', () => {
    expect([0, 1, 2].map((hft) => iec61511MaxSil(hft, 'low'))).toEqual([2, 3, 4]);
    expect([0, 1, 2].map((hft) => iec61511MaxSil(hft, 'continuous'))).toEqual([1, 3, 4]);
  });
});

describe('structure and SFF', () => {
  it('SFF = (lambdaS + lambdaDD) / (lambdaS + lambdaDD + lambdaDU), IEC 61508-2:2010 Annex C (exact to 1e-12)', () => {
    expect(safeFailureFraction({ lambdaDU: 5e-7, lambdaDD: 1.5e-6, lambdaS: 2e-6 })).toBeCloseTo(3.5 / 4, 12);
    expect(safeFailureFraction({ lambdaDU: 0 })).toBeNull();
  });
  it('HFT is the smallest cut order less one: 2oo3 -> 1, 1oo2 -> 1, single -> 0, series -> 0 (IEC 61508-2:2010 7.4.4.1.1)', () => {
    const model = demoTree();
    expect(subsystemsOf(model).map((item) => [item.id, item.hft, item.voting])).toEqual([
      ['SENSORS', 1, '2oo3'],
      ['LS', 0, '1oo1'],
      ['VALVES', 1, '1oo2'],
    ]);
    expect(smallestCutOrder(model, 'TOP')).toBe(1);
  });
});

describe('architectural constraints and the SIL claim', () => {
  it('per subsystem: sensors type B SFF 87.5 % HFT 1 -> SIL 2; logic SFF 99.5 % HFT 0 -> SIL 3; valves type A SFF 33 % HFT 1 -> SIL 2', () => {
    const rows = architecturalConstraints(demoTree());
    expect(rows.map((row) => [row.id, row.route1HMaxSil, row.iec61511MaxSil])).toEqual([
      ['SENSORS', 2, 3],
      ['LS', 3, 2],
      ['VALVES', 2, 3],
    ]);
    expect(rows[2].sff).toBeCloseTo(1 / 3, 12);
  });

  it('the claim is the lowest limit, and each limit names its rule set', () => {
    const constraints = architecturalConstraints(demoTree({ sc: 1 }));
    const claim = silClaim({ probabilitySil: 3, demand: 'low', measureText: 'PFDavg 5e-4', constraints });
    expect(claim.sil).toBe(1);
    const governing = claim.limits.filter((limit) => limit.sil === 1);
    expect(governing.map((limit) => [limit.rule, limit.subsystem])).toEqual([['systematic-capability', 'VALVES']]);
    expect(governing[0].source).toContain('IEC 61508-2');
    expect(new Set(claim.limits.map((limit) => limit.rule))).toEqual(new Set(['probability', 'iec61508-route-1h', 'iec61511-minimum-hft', 'systematic-capability']));
  });

  it('a probability result below SIL 1 or a type B device at SFF < 60 % and HFT 0 allows no claim', () => {
    expect(silClaim({ probabilitySil: null, demand: 'low', measureText: 'PFDavg 0.2', constraints: [] }).sil).toBeNull();
    const model = demoTree();
    const single: FaultTreeModel = { ...model, events: [{ id: 'XV', lambdaDU: 2e-6, lambdaS: 1e-6, deviceType: 'B' }], gates: [], ccf: [], top: 'XV' };
    const claim = silClaim({ probabilitySil: 2, demand: 'low', measureText: 'x', constraints: architecturalConstraints(single) });
    expect(claim.sil).toBeNull();
    expect(claim.limits.find((limit) => limit.sil === null)?.rule).toBe('iec61508-route-1h');
  });

  it('a subsystem without a stated device type is held as type B and says so', () => {
    const model = demoTree();
    const untyped: FaultTreeModel = { ...model, events: model.events.map((event) => ({ ...event, deviceType: undefined })) };
    const rows = architecturalConstraints(untyped);
    expect(rows.every((row) => row.deviceType === 'B' && row.deviceTypeAssumed)).toBe(true);
    expect(rows[2].route1HMaxSil).toBe(1);
    expect(rows[2].notes.join(' ')).toContain('type B taken');
  });
});
