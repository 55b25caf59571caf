import { describe, expect, it } from 'vitest';
import type { FaultTreeModel } from '../../shared/model-file.js';
import { canonicalJson, modelContentHash, resultCacheKey } from './content-hash.js';

const model: FaultTreeModel = {
  format: 'proofline/model',
  version: 1,
  name: 'Invented flare knock-out drum trip',
  kind: 'fault-tree',
  mission: { hours: 87_600, demand: 'low' },
  events: [{ id: 'LT-1', lambdaDU: 1e-6, proofTest: { intervalHours: 8760 } }],
  gates: [{ id: 'TOP', type: 'or', inputs: ['LT-1'] }],
  top: 'TOP',
};

describe('canonicalJson', () => {
  it('sorts object keys at every level and keeps array order', () => {
    expect(canonicalJson({ b: 1, a: { d: [3, 1], c: null } })).toBe('{"a":{"c":null,"d":[3,1]},"b":1}');
    expect(canonicalJson({ a: 1, b: 2 })).toBe(canonicalJson({ b: 2, a: 1 }));
  });

  it('leaves out undefined members, as JSON.stringify does', () => {
    expect(canonicalJson({ a: undefined, b: 1 })).toBe('{"b":1}');
  });
});

describe('modelContentHash', () => {
  it('ignores the layout and nothing else', () => {
    const hash = modelContentHash(model);
    expect(hash).toMatch(/^[0-9a-f]{64}$/);
    expect(modelContentHash({ ...model, layout: { 'LT-1': { x: 10, y: 20 } } })).toBe(hash);
    expect(modelContentHash({ ...model, events: [{ ...model.events[0]!, lambdaDU: 2e-6 }] })).not.toBe(hash);
    expect(modelContentHash({ ...model, name: 'Renamed' })).not.toBe(hash);
  });
});

describe('resultCacheKey', () => {
  it('changes with the solver version and with every setting', () => {
    const key = resultCacheKey('abc', '1.0.0', { method: 'exact', timePoints: 1000 });
    expect(resultCacheKey('abc', '1.0.0', { timePoints: 1000, method: 'exact' })).toBe(key);
    expect(resultCacheKey('abc', '1.0.1', { method: 'exact', timePoints: 1000 })).not.toBe(key);
    expect(resultCacheKey('abc', '1.0.0', { method: 'exact', timePoints: 999 })).not.toBe(key);
    expect(resultCacheKey('abd', '1.0.0', { method: 'exact', timePoints: 1000 })).not.toBe(key);
  });
});
