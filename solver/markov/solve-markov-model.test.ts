import { expm as mathjsExpm, matrix } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { markovModel, type MarkovModel } from '../../shared/model-file.js';
import { solveResult } from '../../shared/solve-result.js';
import { ModelError } from '../common/model-error.js';
import { generateModels } from '../generator/index.js';
import { solveModel } from '../index.js';
import { solveMarkovModel } from './index.js';

const YEAR = 8760;
const METHODS = ['dense', 'uniformization', 'krylov'] as const;

function model(fields: Partial<MarkovModel> & Pick<MarkovModel, 'states' | 'transitions'>, hours = 10 * YEAR): MarkovModel {
  return { format: 'proofline/model', version: 1, name: 'test chain', kind: 'markov', mission: { hours, demand: 'low' }, ...fields };
}

/** 1oo1 with DU failures only and perfect periodic proof tests that restore at once. */
function oneOutOfOne(lambda: number, interval: number, hours = 10 * YEAR): MarkovModel {
  return model(
    {
      states: [{ id: 'OK', initial: 1 }, { id: 'DU', down: true }],
      transitions: [{ from: 'OK', to: 'DU', rate: lambda }],
      tests: [{ intervalHours: interval, moves: [{ from: 'DU', to: 'OK', probability: 1 }] }],
    },
    hours,
  );
}

/** 1oo2 with beta common cause, DU only, perfect tests restoring at once (states: failed channels). */
function oneOutOfTwo(lambda: number, beta: number, interval: number): MarkovModel {
  const independent = (1 - beta) * lambda;
  return model({
    states: [{ id: 'F0', initial: 1 }, { id: 'F1' }, { id: 'F2', down: true }],
    transitions: [
      { from: 'F0', to: 'F1', rate: 2 * independent },
      { from: 'F0', to: 'F2', rate: beta * lambda },
      { from: 'F1', to: 'F2', rate: independent + beta * lambda },
    ],
    tests: [{ intervalHours: interval, moves: [{ from: 'F1', to: 'F0', probability: 1 }, { from: 'F2', to: 'F0', probability: 1 }] }],
  });
}

/** A stiff repairable chain: 1oo2 with DD failures repaired at 1/8 per hour and DU found by tests. */
function repairable(): MarkovModel {
  return model({
    states: [{ id: 'OK', initial: 1 }, { id: 'D1' }, { id: 'U1' }, { id: 'DD', down: true }, { id: 'DU', down: true }, { id: 'UU', down: true }, { id: 'R', down: true }],
    transitions: [
      { from: 'OK', to: 'D1', rate: 2 * 4e-6, detected: true },
      { from: 'OK', to: 'U1', rate: 2 * 1e-6 },
      { from: 'D1', to: 'OK', rate: 0.125 },
      { from: 'D1', to: 'DD', rate: 4e-6, detected: true },
      { from: 'D1', to: 'DU', rate: 1e-6 },
      { from: 'U1', to: 'DU', rate: 4e-6, detected: true },
      { from: 'U1', to: 'UU', rate: 1e-6 },
      { from: 'DD', to: 'D1', rate: 0.25 },
      { from: 'DU', to: 'U1', rate: 0.125 },
      { from: 'R', to: 'OK', rate: 0.125 },
    ],
    tests: [{ intervalHours: 4380, moves: [{ from: 'U1', to: 'R', probability: 1 }, { from: 'UU', to: 'R', probability: 1 }, { from: 'DU', to: 'D1', probability: 1 }] }],
  });
}

function generatorRows(chain: MarkovModel): number[][] {
  const index = new Map(chain.states.map((state, position) => [state.id, position]));
  const n = chain.states.length;
  const rows = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (const transition of chain.transitions) {
    const from = index.get(transition.from)!;
    rows[from][index.get(transition.to)!] += transition.rate;
    rows[from][from] -= transition.rate;
  }
  return rows;
}

/** p0 exp(Q t) by mathjs expm, the reference library. */
function referenceDistribution(chain: MarkovModel, p0: number[], hours: number): number[] {
  const q = generatorRows(chain).map((row) => row.map((value) => value * hours));
  const e = mathjsExpm(matrix(q)).toArray() as number[][];
  return e[0].map((_, j) => p0.reduce((sum, value, i) => sum + value * e[i][j], 0));
}

describe('Markov engine: transient probabilities against mathjs expm', () => {
  it('matches p0 exp(Q t) at every curve time of a chain without tests, each method (dense, uniformization, Krylov), to 1e-9', () => {
    // Reference: mathjs expm (npm, general-purpose library). Tolerance 1e-9 absolute per state.
    const chain = model(
      {
        states: [{ id: 'A', initial: 0.7 }, { id: 'B', initial: 0.3 }, { id: 'C', down: true }, { id: 'D' }],
        transitions: [
          { from: 'A', to: 'B', rate: 0.02 },
          { from: 'B', to: 'C', rate: 0.01 },
          { from: 'C', to: 'A', rate: 0.05 },
          { from: 'B', to: 'D', rate: 0.003 },
          { from: 'D', to: 'A', rate: 0.1 },
        ],
      },
      2000,
    );
    for (const method of METHODS) {
      const result = solveMarkovModel(chain, { chainMethod: method, timePoints: 20 });
      result.curve.hours.forEach((hours, point) => {
        const expected = referenceDistribution(chain, [0.7, 0.3, 0, 0], hours);
        result.states!.forEach((state, index) => expect(Math.abs(state.probability[point] - expected[index])).toBeLessThan(1e-9));
        expect(Math.abs(result.curve.pfd[point] - expected[2])).toBeLessThan(1e-9);
      });
    }
  });

  it('applies test moves between phases: matches phase-by-phase mathjs propagation at the test times', () => {
    // Reference: mathjs expm per phase, moves applied by hand. Tolerance 1e-9 absolute.
    const chain = repairable();
    const hours = chain.mission.hours;
    const result = solveMarkovModel(chain, { chainMethod: 'dense', timePoints: 40 });
    let p = [1, 0, 0, 0, 0, 0, 0];
    const moves: Record<number, number> = { 2: 6, 5: 6, 4: 1 };
    for (let time = 4380; time < hours; time += 4380) {
      p = referenceDistribution(chain, p, 4380);
      const before = result.curve.hours.indexOf(time);
      expect(before).toBeGreaterThan(0);
      expect(Math.abs(result.curve.pfd[before] - (p[3] + p[4] + p[5] + p[6]))).toBeLessThan(1e-9);
      const moved = [...p];
      for (const [from, to] of Object.entries(moves)) {
        moved[to] += p[Number(from)];
        moved[Number(from)] = 0;
      }
      p = moved;
      expect(result.curve.hours[before + 1]).toBe(time);
      expect(Math.abs(result.curve.pfd[before + 1] - (p[3] + p[4] + p[5] + p[6]))).toBeLessThan(1e-9);
    }
  });
});

describe('Markov engine: periodic regime of repeated test phases', () => {
  /** Phase-by-phase reference by mathjs expm with the moves applied by hand; returns p before each test. */
  function phaseReference(chain: MarkovModel, moves: Record<number, number>, interval: number): { time: number; before: number[]; after: number[] }[] {
    const rows: { time: number; before: number[]; after: number[] }[] = [];
    let p = chain.states.map((state) => state.initial ?? 0);
    for (let time = interval; time < chain.mission.hours; time += interval) {
      const before = referenceDistribution(chain, p, interval);
      const after = [...before];
      for (const [from, to] of Object.entries(moves)) {
        after[to] += before[Number(from)];
        after[Number(from)] = 0;
      }
      rows.push({ time, before, after });
      p = after;
    }
    return rows;
  }

  function expectStatesAtTests(chain: MarkovModel, moves: Record<number, number>, interval: number, method: (typeof METHODS)[number] = 'uniformization'): string {
    // Reference: mathjs expm per phase (npm, general-purpose library). Tolerance 1e-9 absolute per state.
    const result = solveMarkovModel(chain, { chainMethod: method, timePoints: 40 });
    for (const { time, before, after } of phaseReference(chain, moves, interval)) {
      const point = result.curve.hours.indexOf(time);
      expect(point).toBeGreaterThan(0);
      result.states!.forEach((state, index) => {
        expect(Math.abs(state.probability[point] - before[index])).toBeLessThan(1e-9);
        expect(Math.abs(state.probability[point + 1] - after[index])).toBeLessThan(1e-9);
      });
    }
    return result.algorithm;
  }

  it('repeats phases once the distribution after a test stops changing, matching mathjs at every test time', () => {
    const algorithm = expectStatesAtTests(repairable(), { 2: 6, 5: 6, 4: 1 }, 4380);
    const repeated = Number(/(\d+) repeated the previous phase/.exec(algorithm)?.[1]);
    expect(repeated).toBeGreaterThan(0);
  });

  it('keeps propagating while an untested hidden failure still accumulates, matching mathjs at every test time', () => {
    const chain = repairable();
    chain.states.push({ id: 'N', down: true });
    chain.transitions.push({ from: 'OK', to: 'N', rate: 3e-6 });
    const algorithm = expectStatesAtTests(chain, { 2: 6, 5: 6, 4: 1 }, 4380);
    expect(algorithm).toMatch(/ 0 repeated the previous phase/);
  });

  it('dense method: repeats phases in the periodic regime too, matching mathjs at every test time', () => {
    const algorithm = expectStatesAtTests(repairable(), { 2: 6, 5: 6, 4: 1 }, 4380, 'dense');
    expect(Number(/(\d+) of \d+ segments repeated the previous phase/.exec(algorithm)?.[1])).toBeGreaterThan(0);
  });

  it('dense method without a periodic regime switches to whole-segment propagators: PFD at every test time as mathjs, to 1e-10', () => {
    // Reference: mathjs expm per phase, PFD = sum of the down states (3, 4, 5, 6 and the untested N).
    // 40 phases of one shape: stepping each would cost more than exp(Q L) once, so the engine switches.
    const chain = repairable();
    chain.states.push({ id: 'N', down: true });
    chain.transitions.push({ from: 'OK', to: 'N', rate: 3e-6 });
    chain.tests![0].intervalHours = chain.mission.hours / 40;
    const result = solveMarkovModel(chain, { chainMethod: 'dense', includeStates: false, timePoints: 400 });
    expect(result.algorithm).toMatch(/ 0 of 40 segments repeated/);
    expect(Number(/(\d+) propagated with whole-segment propagators/.exec(result.algorithm)?.[1])).toBeGreaterThan(20);
    for (const { time, before, after } of phaseReference(chain, { 2: 6, 5: 6, 4: 1 }, chain.tests![0].intervalHours)) {
      const point = result.curve.hours.findIndex((hour) => Math.abs(hour - time) < 1e-6);
      const down = (p: number[]) => p[3] + p[4] + p[5] + p[6] + p[7];
      expect(Math.abs(result.curve.pfd[point] - down(before))).toBeLessThan(1e-10);
      expect(Math.abs(result.curve.pfd[point + 1] - down(after))).toBeLessThan(1e-10);
    }
  });

  it('agrees with the dense Pade-13 solution on a generated shared-crew chain (PFDavg and PFH to 1e-8)', () => {
    // Reference: the dense Pade-13 / Van Loan solution, an unrelated algorithm that propagates every phase.
    // Tolerance 1e-8 relative; the stated error bound must also stay below 1e-8.
    const channel = { lambdaDU: 2e-6, lambdaDD: 3e-6, mttrHours: 8, proofTest: { intervalHours: YEAR / 4 } };
    const { markov } = generateModels({
      name: 'crew check',
      mission: { hours: 10 * YEAR, demand: 'low' },
      sharedRepairCrew: true,
      groups: [
        { id: 'LS', voting: '1oo2', beta: 0.05, betaD: 0.02, channels: { identical: channel, count: 2 } },
        { id: 'XV', voting: '1oo1', channels: [channel] },
      ],
    });
    const dense = solveMarkovModel(markov, { chainMethod: 'dense', includeStates: false, timePoints: 200 });
    const sparse = solveMarkovModel(markov, { chainMethod: 'uniformization', includeStates: false, timePoints: 200 });
    expect(sparse.algorithm).toMatch(/[1-9]\d* repeated the previous phase/);
    expect(Math.abs(dense.pfdAvg - sparse.pfdAvg) / dense.pfdAvg).toBeLessThan(1e-8);
    expect(Math.abs(dense.pfh - sparse.pfh) / dense.pfh).toBeLessThan(1e-8);
    expect(sparse.errorBound).toBeLessThan(1e-8);
  });
});

/** Krylov states at each test time against mathjs expm per phase (moves applied by hand); returns the algorithm. */
function expectKrylovAtTests(chain: MarkovModel, moves: Record<number, number>, interval: number): string {
  // Reference: mathjs expm per phase (npm, general-purpose library). Tolerance 1e-9 absolute per state.
  const result = solveMarkovModel(chain, { chainMethod: 'krylov', timePoints: 40 });
  let p = chain.states.map((state) => state.initial ?? 0);
  for (let time = interval; time < chain.mission.hours; time += interval) {
    const before = referenceDistribution(chain, p, interval);
    const after = [...before];
    for (const [from, to] of Object.entries(moves)) {
      after[to] += before[Number(from)];
      after[Number(from)] = 0;
    }
    const point = result.curve.hours.indexOf(time);
    expect(point).toBeGreaterThan(0);
    result.states!.forEach((state, index) => {
      expect(Math.abs(state.probability[point] - before[index])).toBeLessThan(1e-9);
      expect(Math.abs(state.probability[point + 1] - after[index])).toBeLessThan(1e-9);
    });
    p = after;
  }
  return result.algorithm;
}

describe('Markov engine: Krylov steps for stiff sparse chains', () => {
  it('Krylov: phases with tests and an untested hidden failure match mathjs at every test time (states to 1e-9)', () => {
    // Reference: mathjs expm per phase (npm, general-purpose library), moves applied by hand.
    const chain = repairable();
    chain.states.push({ id: 'N', down: true });
    chain.transitions.push({ from: 'OK', to: 'N', rate: 3e-6 });
    const algorithm = expectKrylovAtTests(chain, { 2: 6, 5: 6, 4: 1 }, 4380);
    expect(algorithm).toMatch(/Krylov steps on the sparse generator/);
  });

  it('agrees with uniformization on a moderately stiff crew chain (qT 1e4) within the stated bounds, and is chosen by the cost estimate', () => {
    // Reference: uniformization, an unrelated algorithm with its own bound. 360 states, repair 1/8 per hour
    // over 10 years (qT about 11,000). Tolerances: PFDavg and PFH within both stated bounds and 1e-10;
    // curve to 1e-12 absolute.
    const channel = (lambdaDU: number, lambdaDD: number) => ({ lambdaDU, lambdaDD, mttrHours: 8, proofTest: { intervalHours: (10 * YEAR) / 40 } });
    const { markov } = generateModels({
      name: 'crew',
      mission: { hours: 10 * YEAR, demand: 'low' },
      sharedRepairCrew: true,
      groups: [
        { id: 'PT', voting: '2oo3', beta: 0.05, betaD: 0.02, channels: { identical: channel(5e-7, 2e-6), count: 3 } },
        { id: 'LS', voting: '1oo2', beta: 0.05, betaD: 0.02, channels: { identical: channel(1e-6, 3e-6), count: 2 } },
        { id: 'XV', voting: '1oo2', beta: 0.05, betaD: 0.02, channels: { identical: channel(2e-6, 1e-6), count: 2 } },
      ],
    });
    const chosen = solveMarkovModel(markov, { includeStates: false });
    expect(chosen.algorithm).toMatch(/Krylov steps on the sparse generator .*; cost estimate .* dense vs .* uniformization vs .* Krylov/);
    const reference = solveMarkovModel(markov, { includeStates: false, chainMethod: 'uniformization' });
    const allowed = Math.min(1e-10, chosen.errorBound! + reference.errorBound!);
    expect(chosen.errorBound).toBeLessThan(1e-7);
    expect(Math.abs(chosen.pfdAvg - reference.pfdAvg) / reference.pfdAvg).toBeLessThan(allowed);
    expect(Math.abs(chosen.pfh - reference.pfh) / reference.pfh).toBeLessThan(allowed);
    chosen.curve.pfd.forEach((value, point) => expect(Math.abs(value - reference.curve.pfd[point])).toBeLessThan(1e-12));
  });

  it('refines its step below the grid where one basis cannot reach a grid point (a fast ring), matching the dense solution to 1e-9', () => {
    // A ring of 120 states at 2 per hour keeps oscillating (eigenvalues 2 (e^(2 pi i k / 120) - 1)), so no
    // 30-vector basis reaches a 50-hour grid step: the step is halved until the estimate holds. Reference:
    // the dense Pade-13 solution; tolerance 1e-9 absolute on the curve and relative on PFDavg.
    const size = 120;
    const states = Array.from({ length: size }, (_, index) => ({ id: `S${index}`, ...(index === 0 ? { initial: 1 } : {}), ...(index % 3 === 0 ? { down: true } : {}) }));
    const transitions = states.map((state, index) => ({ from: state.id, to: states[(index + 1) % size].id, rate: index % 2 ? 2 : 1.5 }));
    const ring = model({ states, transitions }, 1000);
    const krylov = solveMarkovModel(ring, { chainMethod: 'krylov', includeStates: false, timePoints: 20 });
    const dense = solveMarkovModel(ring, { chainMethod: 'dense', includeStates: false, timePoints: 20 });
    expect(Number(/the grid step \/ 2\^(\d+)/.exec(krylov.algorithm)?.[1])).toBeGreaterThan(0);
    expect(Math.abs(krylov.pfdAvg - dense.pfdAvg) / dense.pfdAvg).toBeLessThan(1e-9);
    krylov.curve.pfd.forEach((value, point) => expect(Math.abs(value - dense.curve.pfd[point])).toBeLessThan(1e-9));
  });
});

describe('Markov engine: closed forms of periodically tested systems', () => {
  it('1oo1: PFDavg = 1 - (1 - e^(-lambda tau)) / (lambda tau), PFDmax = 1 - e^(-lambda tau), each method (dense, uniformization, Krylov), to 1e-8', () => {
    // Rausand & Hoyland, System Reliability Theory (2nd ed.), periodically tested item with perfect tests
    // (the exact average unavailability over a test interval; from memory of ch. 10). Mission = 10 tau.
    // PFH: lambda times the time-average of e^(-lambda t) = (1 - e^(-lambda tau)) / tau (exact).
    const lambda = 2e-6;
    const tau = YEAR;
    const exact = 1 - -Math.expm1(-lambda * tau) / (lambda * tau);
    for (const method of METHODS) {
      const result = solveMarkovModel(oneOutOfOne(lambda, tau), { chainMethod: method });
      expect(Math.abs(result.pfdAvg - exact) / exact).toBeLessThan(1e-8);
      expect(Math.abs(result.pfdMax - -Math.expm1(-lambda * tau))).toBeLessThan(1e-12);
      expect(Math.abs(result.pfh - -Math.expm1(-lambda * tau) / tau) / result.pfh).toBeLessThan(1e-8);
      expect(result.rrf).toBeCloseTo(1 / result.pfdAvg, 6);
      expect(result.sil).toBe(2);
      expect(solveResult.safeParse(result).success).toBe(true);
    }
  });

  it('1oo2 with beta: PFDavg equals the exact integral of 1 - e^(-beta l t)(1 - (1 - e^(-(1-beta) l t))^2), to 1e-8', () => {
    // Rausand & Hoyland (2nd ed.), beta-factor model of a periodically tested 1oo2 (ch. 10, from memory):
    // PFD(t) = 1 - e^(-b t) [1 - (1 - e^(-a t))^2], a = (1-beta) lambda, b = beta lambda; integrated in
    // closed form: PFDavg = 1 - [2 (1 - e^(-(a+b) tau)) / (a+b) - (1 - e^(-(2a+b) tau)) / (2a+b)] / tau.
    const lambda = 5e-6;
    const beta = 0.1;
    const tau = YEAR;
    const a = (1 - beta) * lambda;
    const b = beta * lambda;
    const exact = 1 - ((2 * -Math.expm1(-(a + b) * tau)) / (a + b) - -Math.expm1(-(2 * a + b) * tau) / (2 * a + b)) / tau;
    for (const method of METHODS) {
      const result = solveMarkovModel(oneOutOfTwo(lambda, beta, tau), { chainMethod: method });
      expect(Math.abs(result.pfdAvg - exact) / exact).toBeLessThan(1e-8);
    }
  });

  it('the fault-tree engine gives the same closed forms for 1oo1 and 1oo2 with beta, to 1e-8 (the check against both)', () => {
    // The closed forms of the two tests above (Rausand & Hoyland), now for the equivalent fault trees: one
    // event, and two events under an AND gate in a beta-factor group.
    const lambda = 5e-6;
    const beta = 0.1;
    const tau = YEAR;
    const event = (id: string) => ({ id, lambdaDU: lambda, proofTest: { intervalHours: tau } });
    const header = { format: 'proofline/model' as const, version: 1 as const, name: 'tree', kind: 'fault-tree' as const, mission: { hours: 10 * YEAR, demand: 'low' as const } };
    const single = solveModel({ ...header, events: [event('A')], gates: [], top: 'A' });
    const exactSingle = 1 - -Math.expm1(-lambda * tau) / (lambda * tau);
    expect(Math.abs(single.pfdAvg - exactSingle) / exactSingle).toBeLessThan(1e-8);
    expect(Math.abs(solveMarkovModel(oneOutOfOne(lambda, tau)).pfdAvg - single.pfdAvg) / single.pfdAvg).toBeLessThan(1e-8);
    const pair = solveModel({ ...header, events: [event('A'), event('B')], gates: [{ id: 'G', type: 'and', inputs: ['A', 'B'] }], ccf: [{ id: 'CCF', members: ['A', 'B'], beta, model: 'beta' }], top: 'G' });
    const a = (1 - beta) * lambda;
    const b = beta * lambda;
    const exactPair = 1 - ((2 * -Math.expm1(-(a + b) * tau)) / (a + b) - -Math.expm1(-(2 * a + b) * tau) / (2 * a + b)) / tau;
    expect(Math.abs(pair.pfdAvg - exactPair) / exactPair).toBeLessThan(1e-8);
    expect(Math.abs(solveMarkovModel(oneOutOfTwo(lambda, beta, tau)).pfdAvg - pair.pfdAvg) / pair.pfdAvg).toBeLessThan(1e-8);
  });
});

describe('Markov engine: methods and parts agree', () => {
  it('dense and uniformization agree on a stiff repairable chain (PFDavg and PFH to 1e-8, curve to 1e-10)', () => {
    // Internal consistency: two unrelated algorithms on the same chain; tolerances as stated.
    const dense = solveMarkovModel(repairable(), { chainMethod: 'dense' });
    const sparse = solveMarkovModel(repairable(), { chainMethod: 'uniformization' });
    expect(Math.abs(dense.pfdAvg - sparse.pfdAvg) / dense.pfdAvg).toBeLessThan(1e-8);
    expect(Math.abs(dense.pfh - sparse.pfh) / dense.pfh).toBeLessThan(1e-8);
    dense.curve.pfd.forEach((value, point) => expect(Math.abs(value - sparse.curve.pfd[point])).toBeLessThan(1e-10));
    expect(dense.algorithm).toMatch(/Pade-13/);
    expect(sparse.algorithm).toMatch(/uniformization/);
  });

  it('dense and uniformization agree within their stated bounds on a crew chain whose states are mostly down', () => {
    // Internal consistency of two unrelated algorithms. This chain once differed by 8e-11 against a stated
    // 1e-12: the Van Loan block (one down indicator per state times the step) set the Pade scaling, 11
    // squarings instead of 3, each doubling the rounding carried so far (Higham 2005, section 2), and the
    // rows of exp(Q h) lost that much mass at every step. Tolerance: 1e-12 relative (6e-14 measured now),
    // and within both stated bounds.
    const channel = (lambdaDU: number, lambdaDD: number) => ({ lambdaDU, lambdaDD, mttrHours: 8, proofTest: { intervalHours: (10 * YEAR) / 40 } });
    const { markov } = generateModels({
      name: 'many down states',
      mission: { hours: 10 * YEAR, demand: 'low' },
      sharedRepairCrew: true,
      groups: [
        { id: 'LS', voting: '1oo2', beta: 0.05, betaD: 0.02, channels: { identical: channel(1e-6, 3e-6), count: 2 } },
        { id: 'XV', voting: '1oo1', channels: [channel(2e-6, 1e-6)] },
      ],
    });
    expect(markov.states.filter((state) => state.down).length).toBeGreaterThan(0.8 * markov.states.length);
    const dense = solveMarkovModel(markov, { chainMethod: 'dense', includeStates: false });
    const sparse = solveMarkovModel(markov, { chainMethod: 'uniformization', includeStates: false });
    const allowed = dense.errorBound! + sparse.errorBound!;
    expect(allowed).toBeLessThan(1e-9);
    expect(Math.abs(dense.pfdAvg - sparse.pfdAvg) / sparse.pfdAvg).toBeLessThan(Math.min(allowed, 1e-12));
    expect(Math.abs(dense.pfh - sparse.pfh) / sparse.pfh).toBeLessThan(Math.min(allowed, 1e-12));
    dense.curve.pfd.forEach((value, point) => expect(Math.abs(value - sparse.curve.pfd[point])).toBeLessThan(1e-12 * sparse.pfdMax));
  });

  it('independent parts in series equal the product chain: PFDavg and PFH to 1e-7', () => {
    // Exact reference: the Kronecker product chain of two 1oo1 channels with different rates and test
    // intervals, down when either is down, solved as one chain. Tolerance 1e-7 relative (the parts' cross
    // term is integrated by Simpson's rule).
    const first = oneOutOfOne(2e-6, YEAR);
    const second = oneOutOfOne(7e-6, YEAR / 2);
    const series: MarkovModel = { ...first, parts: [{ id: 'B', states: second.states, transitions: second.transitions, tests: second.tests }] };
    const product = model({
      states: [{ id: 'OO', initial: 1 }, { id: 'UO', down: true }, { id: 'OU', down: true }, { id: 'UU', down: true }],
      transitions: [
        { from: 'OO', to: 'UO', rate: 2e-6 },
        { from: 'OU', to: 'UU', rate: 2e-6 },
        { from: 'OO', to: 'OU', rate: 7e-6 },
        { from: 'UO', to: 'UU', rate: 7e-6 },
      ],
      tests: [
        { intervalHours: YEAR, moves: [{ from: 'UO', to: 'OO', probability: 1 }, { from: 'UU', to: 'OU', probability: 1 }] },
        { intervalHours: YEAR / 2, moves: [{ from: 'OU', to: 'OO', probability: 1 }, { from: 'UU', to: 'UO', probability: 1 }] },
      ],
    });
    const combined = solveMarkovModel(series, {});
    const reference = solveMarkovModel(product, {});
    expect(combined.algorithm).toMatch(/2 independent parts in series as declared in the file/);
    expect(reference.algorithm).toMatch(/^one chain as given \(independent parts are taken only as declared/);
    expect(Math.abs(combined.pfdAvg - reference.pfdAvg) / reference.pfdAvg).toBeLessThan(1e-7);
    expect(Math.abs(combined.pfh - reference.pfh) / reference.pfh).toBeLessThan(1e-7);
    expect(combined.states!.map((state) => state.id)).toEqual(['OK', 'DU', 'B/OK', 'B/DU']);
  });

  it('a part is independent by construction: naming a state of the main chain or of another part is an error', () => {
    // docs/model-format.md: state ids are local to their part, so a part cannot reach another's states.
    const first = oneOutOfOne(2e-6, YEAR);
    const coupled: MarkovModel = {
      ...first,
      parts: [
        { id: 'B', states: [{ id: 'UP', initial: 1 }, { id: 'DN', down: true }], transitions: [{ from: 'UP', to: 'DU', rate: 1e-6 }] },
        { id: 'C', states: [{ id: 'UP', initial: 1 }, { id: 'DN', down: true }], transitions: [{ from: 'UP', to: 'DN', rate: 1e-6 }], tests: [{ intervalHours: YEAR, moves: [{ from: 'OK', to: 'UP', probability: 1 }] }] },
      ],
    };
    const error = (() => {
      try {
        solveMarkovModel(coupled, {});
      } catch (caught) {
        return caught as ModelError;
      }
      throw new Error('expected a ModelError');
    })();
    expect(error).toBeInstanceOf(ModelError);
    const text = error.issues.map((issue) => `${issue.path.join('.')}: ${issue.message}`).join('\n');
    expect(text).toMatch(/parts\.0\.transitions\.0\.to: part "B": transition 0 refers to unknown state "DU"/);
    expect(text).toMatch(/parts\.1\.tests\.0\.moves\.0\.from: part "C": test 0 moves from unknown state "OK"/);
  });

  it('leaves transitions marked detected out of PFH but not out of PFD', () => {
    // Definition (IEC 61508-6 B.3.3 convention): a 1oo1 whose only failure is detected has PFH 0 and
    // PFDavg = lambda / (lambda + mu) (1 - (1 - e^(-(lambda+mu) T)) / ((lambda+mu) T)) (exact, two-state
    // chain). Tolerance 1e-9 relative.
    const lambda = 1e-4;
    const mu = 0.125;
    const hours = 1000;
    const chain = model({ states: [{ id: 'OK', initial: 1 }, { id: 'DD', down: true }], transitions: [{ from: 'OK', to: 'DD', rate: lambda, detected: true }, { from: 'DD', to: 'OK', rate: mu }] }, hours);
    const s = lambda + mu;
    const exact = (lambda / s) * (1 - -Math.expm1(-s * hours) / (s * hours));
    const result = solveMarkovModel(chain, {});
    expect(result.pfh).toBe(0);
    expect(Math.abs(result.pfdAvg - exact) / exact).toBeLessThan(1e-9);
  });
});

describe('Markov engine: edge cases', () => {
  it('a chain that never fails has PFDavg 0, the largest finite RRF and a valid result', () => {
    // The result schema (shared/solve-result.ts) holds finite numbers only; the fault-tree engine uses the
    // same Number.MAX_VALUE for an RRF without bound.
    const result = solveMarkovModel(model({ states: [{ id: 'OK', initial: 1 }, { id: 'DU', down: true }], transitions: [] }, 100), {});
    expect(result.pfdAvg).toBe(0);
    expect(result.rrf).toBe(Number.MAX_VALUE);
    expect(solveResult.safeParse(result).success).toBe(true);
  });
});

describe('Markov engine: bad input and cancellation', () => {
  const bad = (change: (value: MarkovModel) => void) => {
    const value = structuredClone(repairable());
    change(value);
    return value;
  };
  const issuesOf = (value: MarkovModel) => {
    try {
      solveMarkovModel(value, {});
    } catch (error) {
      expect(error).toBeInstanceOf(ModelError);
      return (error as ModelError).lines().join('\n');
    }
    throw new Error('expected a ModelError');
  };

  it('names unknown states, negative rates, self transitions, missing initial distribution and bad test rows', () => {
    expect(issuesOf(bad((value) => (value.transitions[0].to = 'NOPE')))).toMatch(/transitions\[0\]\.to: .*unknown state "NOPE"/);
    expect(issuesOf(bad((value) => (value.transitions[1].rate = -1)))).toMatch(/transitions\[1\]\.rate: the rate must be a finite number >= 0/);
    expect(issuesOf(bad((value) => (value.transitions[2].rate = Number.NaN)))).toMatch(/transitions\[2\]\.rate/);
    expect(issuesOf(bad((value) => (value.transitions[0].to = 'OK')))).toMatch(/goes from "OK" into the same state/);
    expect(issuesOf(bad((value) => (value.states[0].initial = undefined)))).toMatch(/initial probabilities sum to 0, not 1/);
    expect(issuesOf(bad((value) => (value.tests![0].moves[0].probability = 0.4)))).toMatch(/tests\[0\]\.moves: .*moves out of "U1" sum to 0.4, not 1/);
    expect(issuesOf(bad((value) => (value.tests![0].moves[0].from = 'GHOST')))).toMatch(/unknown state "GHOST"/);
    expect(issuesOf(bad((value) => (value.tests![0].firstHours = 1e9)))).toMatch(/first test at .* after the mission end/);
  });

  it('refuses a model over 2,000,000 generator entries at once, without building it', () => {
    const state = { id: 'S' };
    const huge = model({ states: new Array(2_000_001).fill(state), transitions: [] });
    const started = performance.now();
    expect(issuesOf(huge)).toMatch(/2,000,001 generator entries .* at most 2,000,000/);
    expect(performance.now() - started).toBeLessThan(5000);
  });

  it('refuses a chain it estimates at over 10 minutes instead of hanging, naming the size and the remedy', () => {
    // 200,000 states in a ring with rate 10 per hour over 10 years: about 1e11 sparse operations.
    const size = 200_000;
    const states = Array.from({ length: size }, (_, index) => ({ id: `S${index}`, ...(index === 0 ? { initial: 1 } : {}), ...(index % 2 ? { down: true } : {}) }));
    const transitions = states.map((state, index) => ({ from: state.id, to: states[(index + 1) % size].id, rate: 10 }));
    const started = performance.now();
    expect(issuesOf(model({ states, transitions }))).toMatch(/states: chain \(200000 states\) would take about \d+ minutes to solve \(limit 10 minutes\)/);
    expect(performance.now() - started).toBeLessThan(20_000);
  });

  it('checks the schema the same way (the zod model rejects what the engine rejects)', () => {
    expect(markovModel.safeParse(bad((value) => (value.transitions[1].rate = -1))).success).toBe(false);
    expect(markovModel.safeParse(repairable()).success).toBe(true);
  });

  it('stops with the signal reason when cancelled between phases, each method, and reports progress up to 1', () => {
    for (const method of METHODS) {
      const reason = new Error(`cancelled by the user (${method})`);
      const controller = new AbortController();
      expect(() =>
        solveMarkovModel(repairable(), {
          chainMethod: method,
          signal: controller.signal,
          onProgress: (fraction) => {
            if (fraction > 0.3) controller.abort(reason);
          },
        }),
      ).toThrow(reason);
    }
    const fractions: number[] = [];
    solveMarkovModel(repairable(), { onProgress: (fraction) => fractions.push(fraction) });
    expect(fractions[fractions.length - 1]).toBe(1);
    fractions.forEach((fraction, index) => index > 0 && expect(fraction).toBeGreaterThanOrEqual(fractions[index - 1]));
  });
});

describe('Markov engine: failure frequency curve', () => {
  it('1oo1: w(t) = lambda e^(-lambda (t - last test)) at every curve hour, each method (dense, uniformization, Krylov), to 1e-12 relative', () => {
    // Exact: the up state's probability is e^(-lambda s) s hours after a perfect test, and its only flow
    // into the down state is lambda (Rausand & Hoyland, periodically tested item, from memory of ch. 10).
    const lambda = 2e-6;
    const tau = YEAR;
    for (const method of METHODS) {
      const result = solveMarkovModel(oneOutOfOne(lambda, tau), { chainMethod: method, timePoints: 200 });
      const frequency = result.curve.frequency!;
      expect(frequency).toHaveLength(result.curve.hours.length);
      result.curve.hours.forEach((hour, point) => {
        // At a test time the curve holds the hour twice: before the test (s = tau) and after it (s = 0).
        const afterTest = point > 0 && result.curve.hours[point - 1] === hour;
        const since = afterTest ? 0 : hour - Math.ceil(hour / tau - 1e-9) * tau + (hour === 0 ? 0 : tau);
        const exact = lambda * Math.exp(-lambda * since);
        expect(Math.abs(frequency[point] - exact) / exact).toBeLessThan(1e-12);
      });
    }
  });

  it('its time average (trapezoid rule on the curve grid) equals PFH within 1e-4 relative, one chain and parts in series', () => {
    // Definition (issue 4 / IEC 61508-4 3.6.19 for PFH as an average frequency): PFH is the time average of
    // w(t). The curve holds each test time on both sides, so the trapezoid rule integrates a w(t) that is
    // smooth between tests; its error h^2 T max|w''| / 12 (common practice) is set by the 8-hour repair
    // transients after each test, so the grid is fine here (16,000 points: 400 per test interval, where
    // the error measured 2e-5 and fell as h^2 from 2e-3 at 1,000 points).
    const channel = { lambdaDU: 2e-6, lambdaDD: 3e-6, mttrHours: 8, proofTest: { intervalHours: YEAR / 4 } };
    const single = generateModels({
      name: 'frequency check',
      mission: { hours: 10 * YEAR, demand: 'high' },
      groups: [{ id: 'LS', voting: '1oo2', beta: 0.05, betaD: 0.02, channels: { identical: channel, count: 2 } }],
    }).markov;
    const series = generateModels({
      name: 'frequency check in series',
      mission: { hours: 10 * YEAR, demand: 'high' },
      groups: [
        { id: 'LS', voting: '1oo2', beta: 0.05, betaD: 0.02, channels: { identical: channel, count: 2 } },
        { id: 'PT', voting: '2oo3', beta: 0.05, channels: { identical: { ...channel, lambdaDU: 5e-7 }, count: 3 } },
      ],
    }).markov;
    expect(series.parts?.length).toBe(1);
    for (const chain of [single, series]) {
      const result = solveMarkovModel(chain, { includeStates: false, timePoints: 16_000 });
      const { hours, frequency } = result.curve;
      let integral = 0;
      for (let point = 1; point < hours.length; point += 1) integral += ((hours[point] - hours[point - 1]) * (frequency![point] + frequency![point - 1])) / 2;
      const average = integral / chain.mission.hours;
      expect(result.pfh).toBeGreaterThan(0);
      expect(Math.abs(average - result.pfh) / result.pfh).toBeLessThan(1e-4);
      expect(solveResult.safeParse(result).success).toBe(true);
    }
  });
});
