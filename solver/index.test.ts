import { describe, expect, it } from 'vitest';
import { MAX_FAULT_TREE_ITEMS, type FaultTreeModel, type ModelFile } from '../shared/model-file.js';
import { solveResult } from '../shared/solve-result.js';
import { ModelError, SOLVER_VERSION, SolverUnavailableError, solveModel } from './index.js';
import { channel, faultTree, votedGroup } from './fault-tree/test-models.js';

const base = () => votedGroup(3, 2, { lambdaDU: 3e-7, lambdaDD: 1e-6, mttrHours: 8, intervalHours: 8760, missionHours: 87600, beta: 0.05 });

function issuesOf(model: unknown): { path: string; message: string }[] {
  try {
    solveModel(model as ModelFile);
  } catch (error) {
    expect(error).toBeInstanceOf(ModelError);
    return (error as ModelError).lines().map((line) => {
      const at = line.indexOf(': ');
      return { path: line.slice(0, at), message: line.slice(at + 2) };
    });
  }
  throw new Error('the model was accepted');
}

describe('solveModel', () => {
  it('returns a result that passes the shared result schema, with the version and the curve', () => {
    const result = solveModel(base(), { timePoints: 200 });
    expect(solveResult.safeParse(result).success).toBe(true);
    expect(result.solverVersion).toBe(SOLVER_VERSION);
    expect(result.curve.hours.length).toBeGreaterThanOrEqual(200);
    expect(result.curve.hours[0]).toBe(0);
    expect(result.curve.hours.at(-1)).toBe(87600);
    expect(result.rrf).toBeCloseTo(1 / result.pfdAvg, 9);
    // IEC 61508-1 Table 2: SIL 4 is PFDavg from 1e-5 up to 1e-4.
    expect(result.pfdAvg).toBeGreaterThanOrEqual(1e-5);
    expect(result.pfdAvg).toBeLessThan(1e-4);
    expect(result.sil).toBe(4);
  });

  it('reports progress up to 1 and stops when the signal is aborted', () => {
    const fractions: number[] = [];
    solveModel(base(), { onProgress: (fraction) => fractions.push(fraction) });
    expect(fractions.at(-1)).toBe(1);
    expect([...fractions].sort((a, b) => a - b)).toEqual(fractions);
    const controller = new AbortController();
    const reason = new Error('cancelled by the user');
    expect(() =>
      solveModel(base(), {
        signal: controller.signal,
        onProgress: (fraction) => {
          if (fraction >= 0.15) controller.abort(reason);
        },
      }),
    ).toThrow(reason);
  });

  it('sends state models to the Markov engine and method montecarlo to the simulator (fault trees only)', () => {
    const markov: ModelFile = { format: 'proofline/model', version: 1, name: 'm', kind: 'markov', mission: { hours: 100, demand: 'low' }, states: [{ id: 'OK', initial: 1 }], transitions: [] };
    expect(solveModel(markov).method).toBe('markov');
    expect(solveModel(base(), { method: 'montecarlo', samples: 100 }).method).toBe('montecarlo');
    expect(() => solveModel(markov, { method: 'montecarlo' })).toThrow(SolverUnavailableError);
  });
});

describe('bad models: a ModelError naming the item and its path', () => {
  it('unknown input, cycle, k out of range', () => {
    const model = faultTree({
      missionHours: 1000,
      events: [channel('A', { lambdaDU: 1e-6 }), channel('B', { lambdaDU: 1e-6 })],
      gates: [
        { id: 'TOP', type: 'atLeast', k: 4, inputs: ['A', 'B', 'G2'] },
        { id: 'G2', type: 'or', inputs: ['TOP', 'NOPE'] },
      ],
      top: 'TOP',
    });
    const issues = issuesOf(model);
    expect(issues).toContainEqual({ path: 'gates[1].inputs[1]', message: 'gate "G2" has unknown input "NOPE"' });
    expect(issues).toContainEqual({ path: 'gates[0].k', message: 'voting gate "TOP" has k = 4 but only 3 inputs' });
    expect(issues.find((issue) => issue.path === 'gates')?.message).toMatch(/cycle: TOP -> G2 -> TOP/);
  });

  it.each([
    ['negative rate', (m: FaultTreeModel) => ({ ...m, events: m.events.map((e, i) => (i === 1 ? { ...e, lambdaDU: -1e-6 } : e)) }), 'events[1].lambdaDU'],
    ['NaN rate', (m: FaultTreeModel) => ({ ...m, events: m.events.map((e, i) => (i === 2 ? { ...e, lambdaDD: Number.NaN } : e)) }), 'events[2].lambdaDD'],
    [
      'coverage above 1',
      (m: FaultTreeModel) => ({ ...m, events: m.events.map((e, i) => (i === 0 && 'proofTest' in e ? { ...e, proofTest: { ...e.proofTest, intervalHours: 8760, coverage: 1.2 } } : e)) }),
      'events[0].proofTest.coverage',
    ],
    [
      'interval longer than the mission',
      (m: FaultTreeModel) => ({ ...m, events: m.events.map((e, i) => (i === 0 && 'proofTest' in e ? { ...e, proofTest: { intervalHours: 100000 } } : e)) }),
      'events[0].proofTest.intervalHours',
    ],
    [
      'partial test coverage above the proof test coverage',
      (m: FaultTreeModel) => ({ ...m, events: m.events.map((e, i) => (i === 0 && 'proofTest' in e ? { ...e, proofTest: { intervalHours: 8760, coverage: 0.5 }, partialTest: { intervalHours: 730, coverage: 0.6 } } : e)) }),
      'events[0].partialTest.coverage',
    ],
    ['PDS group with no matching gate and no factor', (m: FaultTreeModel) => ({ ...m, ccf: [{ id: 'CCF', members: ['CH-1', 'CH-2'], beta: 0.05, model: 'pds' as const }] }), 'ccf[0].model'],
  ])('%s', (_, change, path) => {
    const issues = issuesOf(change(base()));
    expect(issues.map((issue) => issue.path)).toContain(path);
  });

  it(`a model over ${MAX_FAULT_TREE_ITEMS} events and gates is refused, not solved`, () => {
    const events = Array.from({ length: MAX_FAULT_TREE_ITEMS }, (_, i) => ({ id: `E${i}`, probability: 0.001 }));
    const model = faultTree({ missionHours: 10, events, gates: [{ id: 'TOP', type: 'or', inputs: events.map((e) => e.id) }], top: 'TOP' });
    const issues = issuesOf(model);
    expect(issues[0].path).toBe('(file)');
    expect(issues[0].message).toMatch(/20001 events and gates; at most 20000/);
  });

  it('the PDS table factor of a 2oo3 group is applied (C_2oo3 = 2), and factor 1 is the beta model', () => {
    const beta = base();
    const group = (beta.ccf ?? [])[0];
    const fromTable = solveModel({ ...beta, ccf: [{ ...group, model: 'pds' }] }).pfdAvg;
    const factorTwo = solveModel({ ...beta, ccf: [{ ...group, model: 'pds', factor: 2 }] }).pfdAvg;
    const factorOne = solveModel({ ...beta, ccf: [{ ...group, model: 'pds', factor: 1 }] }).pfdAvg;
    expect(fromTable).toBe(factorTwo);
    expect(factorOne).toBe(solveModel(beta).pfdAvg);
    expect(fromTable).toBeGreaterThan(factorOne * 1.5);
  });
});
