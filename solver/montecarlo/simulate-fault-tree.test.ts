import { describe, expect, it } from 'vitest';
import type { FaultTreeModel, RateEvent } from '../../shared/model-file.js';
import { solveResult } from '../../shared/solve-result.js';
import { ModelError } from '../common/model-error.js';
import { generateModels } from '../generator/index.js';
import { solveModel } from '../index.js';
import { simulateFaultTreeModel } from './index.js';

const YEAR = 8760;

function tree(events: RateEvent[], gates: FaultTreeModel['gates'], top: string, extra: Partial<FaultTreeModel> = {}): FaultTreeModel {
  return { format: 'proofline/model', version: 1, name: 'simulated', kind: 'fault-tree', mission: { hours: 10 * YEAR, demand: 'low' }, events, gates, top, ...extra };
}

const inside = (value: number, range: { lower: number; upper: number }) => value >= range.lower && value <= range.upper;

describe('Monte Carlo simulation of fault trees (fixed seeds)', () => {
  it('1oo1 with periodic perfect tests: the closed-form PFDavg and PFH lie inside the 99 % intervals', () => {
    // Rausand & Hoyland, System Reliability Theory (2nd ed.), periodically tested item: PFDavg =
    // 1 - (1 - e^(-l tau)) / (l tau) (exact); PFH = (1 - e^(-l tau)) / tau (exact, DU failures per hour).
    const lambda = 2e-5;
    const model = tree([{ id: 'PT', lambdaDU: lambda, proofTest: { intervalHours: YEAR } }], [], 'PT');
    const result = simulateFaultTreeModel(model, { samples: 20_000, seed: 42 });
    const pfdAvg = 1 - -Math.expm1(-lambda * YEAR) / (lambda * YEAR);
    const pfh = -Math.expm1(-lambda * YEAR) / YEAR;
    expect(inside(pfdAvg, result.interval!.pfdAvg)).toBe(true);
    expect(inside(pfh, result.interval!.pfh)).toBe(true);
    expect(result.interval!.pfdAvg.upper - result.interval!.pfdAvg.lower).toBeLessThan(0.1 * pfdAvg);
    expect(result.samples).toBe(20_000);
    expect(solveResult.safeParse(result).success).toBe(true);
  });

  it('1oo2 with beta common cause: the closed form lies inside the 99 % interval', () => {
    // Rausand & Hoyland (2nd ed.), beta-factor 1oo2 with perfect periodic tests (from memory of ch. 10):
    // PFDavg = 1 - [2 (1 - e^(-(a+b) tau)) / (a+b) - (1 - e^(-(2a+b) tau)) / (2a+b)] / tau.
    const lambda = 4e-5;
    const beta = 0.1;
    const channel = (id: string): RateEvent => ({ id, lambdaDU: lambda, proofTest: { intervalHours: YEAR } });
    const model = tree([channel('A'), channel('B')], [{ id: 'TOP', type: 'and', inputs: ['A', 'B'] }], 'TOP', {
      ccf: [{ id: 'CCF', members: ['A', 'B'], beta, model: 'beta' }],
    });
    const a = (1 - beta) * lambda;
    const b = beta * lambda;
    const exact = 1 - ((2 * -Math.expm1(-(a + b) * YEAR)) / (a + b) - -Math.expm1(-(2 * a + b) * YEAR) / (2 * a + b)) / YEAR;
    const result = simulateFaultTreeModel(model, { samples: 40_000, seed: 7 });
    expect(inside(exact, result.interval!.pfdAvg)).toBe(true);
  });

  it('2oo3 with DD, MTTR, partial tests, imperfect proof tests and test downtime: the exact engine lies inside the intervals', () => {
    // Reference: the exact fault-tree engine (decision diagram, an independent method) on the same model.
    const { faultTree } = generateModels({
      name: 'Simulated 2oo3',
      mission: { hours: 10 * YEAR, demand: 'low' },
      groups: [{ id: 'PT', voting: '2oo3', beta: 0.05, betaD: 0.02, channels: { identical: { lambdaDU: 8e-6, lambdaDD: 2e-5, mttrHours: 24, proofTest: { intervalHours: YEAR, coverage: 0.9 } }, count: 3 } }],
    });
    for (const event of faultTree.events as RateEvent[]) {
      event.partialTest = { intervalHours: YEAR / 4, coverage: 0.5 };
      event.proofTest = { ...event.proofTest!, durationHours: 6 };
    }
    const exact = solveModel(faultTree);
    const result = simulateFaultTreeModel(faultTree, { samples: 20_000, seed: 2026 });
    expect(inside(exact.pfdAvg, result.interval!.pfdAvg)).toBe(true);
    expect(inside(exact.pfh, result.interval!.pfh)).toBe(true);
  });

  it('staggered tests, an on-demand probability and a shared input: the exact engine lies inside the intervals', () => {
    // Reference: the exact fault-tree engine on the same DAG.
    const model = tree(
      [
        { id: 'A', lambdaDU: 2e-5, lambdaDD: 1e-5, mttrHours: 48, proofTest: { intervalHours: YEAR, firstHours: YEAR / 2 } },
        { id: 'B', lambdaDU: 3e-5, mttrHours: 8, proofTest: { intervalHours: YEAR } },
        { id: 'S', lambdaDU: 1e-6 },
      ],
      [
        { id: 'TOP', type: 'or', inputs: ['PAIR', 'OP'] },
        { id: 'PAIR', type: 'and', inputs: ['LEFT', 'RIGHT'] },
        { id: 'LEFT', type: 'or', inputs: ['A', 'S'] },
        { id: 'RIGHT', type: 'or', inputs: ['B', 'S'] },
      ],
      'TOP',
    );
    model.events.push({ id: 'OP', probability: 0.002 });
    const exact = solveModel(model);
    const result = simulateFaultTreeModel(model, { samples: 40_000, seed: 99 });
    expect(inside(exact.pfdAvg, result.interval!.pfdAvg)).toBe(true);
    expect(inside(exact.pfh, result.interval!.pfh)).toBe(true);
  });

  it('is reproducible: the same seed gives the same result, another seed a different one', () => {
    const model = tree([{ id: 'PT', lambdaDU: 2e-5, proofTest: { intervalHours: YEAR } }], [], 'PT');
    const first = simulateFaultTreeModel(model, { samples: 2000, seed: 5 });
    const again = simulateFaultTreeModel(model, { samples: 2000, seed: 5 });
    const other = simulateFaultTreeModel(model, { samples: 2000, seed: 6 });
    expect(again.pfdAvg).toBe(first.pfdAvg);
    expect(again.curve.pfd).toEqual(first.curve.pfd);
    expect(other.pfdAvg).not.toBe(first.pfdAvg);
  });

  it('reports progress per batch and stops with the signal reason when cancelled', () => {
    const model = tree([{ id: 'PT', lambdaDU: 2e-5, proofTest: { intervalHours: YEAR } }], [], 'PT');
    const fractions: number[] = [];
    simulateFaultTreeModel(model, { samples: 5000, batchSize: 1000, onProgress: (fraction) => fractions.push(fraction) });
    expect(fractions).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    const controller = new AbortController();
    const reason = new Error('stopped by the reviewer');
    expect(() =>
      simulateFaultTreeModel(model, { samples: 100_000, batchSize: 1000, signal: controller.signal, onProgress: (fraction) => fraction >= 0.05 && controller.abort(reason) }),
    ).toThrow(reason);
  });

  it('names bad options and bad models', () => {
    const model = tree([{ id: 'PT', lambdaDU: 2e-5 }], [], 'PT');
    expect(() => simulateFaultTreeModel(model, { samples: 0 })).toThrow(/samples must be an integer from 1/);
    expect(() => simulateFaultTreeModel(model, { seed: 0.5 })).toThrow(/seed must be an integer/);
    const broken = tree([{ id: 'PT', lambdaDU: 2e-5 }], [{ id: 'TOP', type: 'or', inputs: ['PT', 'GHOST'] }], 'TOP');
    expect(() => simulateFaultTreeModel(broken, {})).toThrow(ModelError);
    expect(() => simulateFaultTreeModel(broken, {})).toThrow(/unknown input "GHOST"/);
  });
});
