import { describe, expect, it } from 'vitest';
import { SOLVER_VERSION, solveModel } from '../index.js';
import { solveFaultTree } from './solve-fault-tree.js';
import { faultTree, votedGroup } from './test-models.js';

describe('fallback for trees beyond the diagram budget: minimal cut sets with stated bounds', () => {
  const shared = faultTree({
    missionHours: 8760,
    events: Array.from({ length: 8 }, (_, i) => ({ id: `P${i}`, lambdaDU: 2e-6 * (1 + i / 8), proofTest: { intervalHours: 2190, firstHours: 730 + 100 * i } })),
    gates: [
      { id: 'TOP', type: 'or', inputs: ['A', 'B', 'C'] },
      { id: 'A', type: 'atLeast', k: 2, inputs: ['P0', 'P1', 'P2', 'P3'] },
      { id: 'B', type: 'atLeast', k: 2, inputs: ['P2', 'P3', 'P4', 'P5'] },
      { id: 'C', type: 'and', inputs: ['P5', 'P6', 'P7', 'P0'] },
    ],
    top: 'TOP',
  });

  it('the exact PFDavg lies between the stated bounds, and the upper bound is reported', () => {
    const exact = solveModel(shared).pfdAvg;
    const fallback = solveFaultTree(shared, { nodeLimit: 8 }, SOLVER_VERSION);
    expect(fallback.algorithm).toMatch(/minimal cut sets/);
    const match = /([\d.e+-]+) <= PFDavg <= ([\d.e+-]+)/.exec(fallback.warnings.join(' '));
    expect(match).not.toBeNull();
    const [lower, upper] = [Number(match?.[1]), Number(match?.[2])];
    expect(lower).toBeLessThanOrEqual(exact);
    expect(upper).toBeGreaterThanOrEqual(exact);
    // Rare-event view: with q about 1e-3 the union bound is within a few per cent of the exact value.
    expect(fallback.pfdAvg / exact).toBeLessThan(1.05);
    expect(fallback.cutSets.map((cutSet) => cutSet.order).sort()).toEqual([2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 4]);
  });

  it('a diagram too costly to evaluate also falls back, with the reason stated', () => {
    const model = votedGroup(3, 2, { lambdaDU: 1e-6, intervalHours: 8760, missionHours: 87600, beta: 0.05 });
    const fallback = solveFaultTree(model, { workLimit: 10 }, SOLVER_VERSION);
    expect(fallback.warnings[0]).toMatch(/not exact: the decision diagram has \d+ nodes/);
    expect(fallback.pfdAvg).toBeGreaterThanOrEqual(solveModel(model).pfdAvg);
  });
});
