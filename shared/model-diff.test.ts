import { describe, expect, it } from 'vitest';
import type { FaultTreeModel, MarkovModel } from './model-file.js';
import { diffModels, itemChanged, modelItems } from './model-diff.js';

/** An invented 2oo3 pressure trip on a fictional separator (rates per hour). */
function pressureTrip(): FaultTreeModel {
  return {
    format: 'proofline/model',
    version: 1,
    name: 'Separator V-310 high pressure, 2oo3',
    kind: 'fault-tree',
    mission: { hours: 87_600, demand: 'low' },
    events: [
      { id: 'PT-A', lambdaDU: 3.0e-7, proofTest: { intervalHours: 8760 } },
      { id: 'PT-B', lambdaDU: 3.0e-7, proofTest: { intervalHours: 8760 } },
      { id: 'PT-C', lambdaDU: 3.0e-7, proofTest: { intervalHours: 8760 } },
    ],
    gates: [{ id: 'TOP', type: 'atLeast', k: 2, inputs: ['PT-A', 'PT-B', 'PT-C'] }],
    ccf: [{ id: 'CCF-PT', members: ['PT-A', 'PT-B', 'PT-C'], beta: 0.05, model: 'beta' }],
    top: 'TOP',
    layout: { TOP: { x: 0, y: 0 } },
  };
}

describe('diffModels', () => {
  it('finds nothing between a model and its copy, and ignores the layout', () => {
    const moved = { ...pressureTrip(), layout: { TOP: { x: 300, y: 90 } } };
    expect(diffModels(pressureTrip(), moved)).toEqual([]);
  });

  it('names each changed field with its old and new value, nested fields by dotted path', () => {
    const after = pressureTrip();
    after.events[1] = { id: 'PT-B', lambdaDU: 4.5e-7, proofTest: { intervalHours: 17_520 } };
    after.ccf = [{ id: 'CCF-PT', members: ['PT-A', 'PT-B', 'PT-C'], beta: 0.1, model: 'beta' }];
    expect(diffModels(pressureTrip(), after)).toEqual([
      {
        kind: 'event',
        id: 'PT-B',
        change: 'changed',
        fields: [
          { field: 'lambdaDU', old: 3.0e-7, new: 4.5e-7 },
          { field: 'proofTest.intervalHours', old: 8760, new: 17_520 },
        ],
      },
      { kind: 'ccf', id: 'CCF-PT', change: 'changed', fields: [{ field: 'beta', old: 0.05, new: 0.1 }] },
    ]);
  });

  it('lists removed and added items with all their fields, and gate input changes', () => {
    const after = pressureTrip();
    after.events = after.events.filter((event) => event.id !== 'PT-C');
    after.events.push({ id: 'PT-D', lambdaDU: 2.0e-7 });
    after.gates = [{ id: 'TOP', type: 'atLeast', k: 2, inputs: ['PT-A', 'PT-B', 'PT-D'] }];
    after.ccf = [];
    const changes = diffModels(pressureTrip(), after);
    expect(changes.map((change) => `${change.change} ${change.kind} ${change.id}`)).toEqual([
      'removed event PT-C',
      'changed gate TOP',
      'removed ccf CCF-PT',
      'added event PT-D',
    ]);
    expect(changes[0]!.fields).toContainEqual({ field: 'lambdaDU', old: 3.0e-7, new: undefined });
    expect(changes[1]!.fields).toEqual([{ field: 'inputs', old: ['PT-A', 'PT-B', 'PT-C'], new: ['PT-A', 'PT-B', 'PT-D'] }]);
    expect(changes[3]!.fields).toEqual([{ field: 'lambdaDU', old: undefined, new: 2.0e-7 }]);
  });

  it('reports header changes (mission, name) on the model item', () => {
    const after = { ...pressureTrip(), mission: { hours: 43_800, demand: 'low' as const } };
    expect(diffModels(pressureTrip(), after)).toEqual([
      { kind: 'model', id: '', change: 'changed', fields: [{ field: 'mission.hours', old: 87_600, new: 43_800 }] },
    ]);
  });

  it('keys Markov transitions by from->to and part states by part/state', () => {
    const before: MarkovModel = {
      format: 'proofline/model',
      version: 1,
      name: 'Invented single valve',
      kind: 'markov',
      mission: { hours: 8760, demand: 'low' },
      states: [{ id: 'OK', initial: 1 }, { id: 'DU', down: true }],
      transitions: [{ from: 'OK', to: 'DU', rate: 1e-6 }],
      parts: [{ id: 'SOL', states: [{ id: 'OK', initial: 1 }, { id: 'F', down: true }], transitions: [{ from: 'OK', to: 'F', rate: 2e-7 }] }],
    };
    expect([...modelItems(before).keys()]).toEqual([
      'model:', 'model:part SOL', 'state:OK', 'state:DU', 'transition:OK->DU', 'state:SOL/OK', 'state:SOL/F', 'transition:SOL/OK->F',
    ]);
    const after: MarkovModel = { ...before, transitions: [{ from: 'OK', to: 'DU', rate: 2e-6 }] };
    expect(diffModels(before, after)).toEqual([
      { kind: 'transition', id: 'OK->DU', change: 'changed', fields: [{ field: 'rate', old: 1e-6, new: 2e-6 }] },
    ]);
    expect(itemChanged(before, after, 'transition', 'OK->DU')).toBe(true);
    expect(itemChanged(before, after, 'state', 'DU')).toBe(false);
    expect(itemChanged(before, after, 'state', 'GONE')).toBe(true);
  });
});
