import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Gate } from '../../shared/model-file.js';
import { solveModel } from '../index.js';
import { Bdd } from './bdd.js';
import { FaultTreeEngine } from './engine.js';
import { channel, faultTree, votedGroup } from './test-models.js';

// Every property runs with a fixed seed so a failure can be replayed.
const SEED = 20261202;

interface RandomTree {
  probabilities: number[];
  gates: { type: 'or' | 'and' | 'atLeast'; k: number; inputs: number[] }[];
}

/** Random DAGs: gate g draws inputs among the events and the gates before it; the last gate is the top. */
const randomTree: fc.Arbitrary<RandomTree> = fc
  .record({
    probabilities: fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 2, maxLength: 7 }),
    gateCount: fc.integer({ min: 1, max: 5 }),
    seeds: fc.array(fc.tuple(fc.constantFrom('or', 'and', 'atLeast'), fc.integer({ min: 1, max: 6 }), fc.array(fc.nat(), { minLength: 1, maxLength: 5 })), { minLength: 5, maxLength: 5 }),
  })
  .map(({ probabilities, gateCount, seeds }) => {
    const gates: RandomTree['gates'] = [];
    for (let g = 0; g < gateCount; g++) {
      const [type, kSeed, picks] = seeds[g];
      const available = probabilities.length + g;
      const inputs = [...new Set(picks.map((pick) => pick % available))];
      if (g > 0 && !inputs.includes(probabilities.length + g - 1)) inputs.push(probabilities.length + g - 1);
      gates.push({ type: type as 'or' | 'and' | 'atLeast', k: 1 + (kSeed % inputs.length), inputs });
    }
    return { probabilities, gates };
  });

const nodeName = (tree: RandomTree, index: number) => (index < tree.probabilities.length ? `E${index}` : `G${index - tree.probabilities.length}`);

function toModel(tree: RandomTree, reverseInputs = false) {
  const gates: Gate[] = tree.gates.map((gate, index) => {
    const inputs = gate.inputs.map((input) => nodeName(tree, input));
    return { id: `G${index}`, type: gate.type, ...(gate.type === 'atLeast' ? { k: gate.k } : {}), inputs: reverseInputs ? inputs.reverse() : inputs };
  });
  return faultTree({
    missionHours: 1000,
    events: tree.probabilities.map((probability, index) => ({ id: `E${index}`, probability })),
    gates,
    top: `G${tree.gates.length - 1}`,
  });
}

/** P(top) by enumerating all 2^n event states and evaluating the gates directly. */
function bruteForce(tree: RandomTree): number {
  const n = tree.probabilities.length;
  let total = 0;
  for (let state = 0; state < 1 << n; state++) {
    let weight = 1;
    const failed: boolean[] = [];
    for (let e = 0; e < n; e++) {
      const isFailed = ((state >> e) & 1) === 1;
      failed.push(isFailed);
      weight *= isFailed ? tree.probabilities[e] : 1 - tree.probabilities[e];
    }
    for (const gate of tree.gates) {
      const count = gate.inputs.filter((input) => failed[input]).length;
      failed.push(gate.type === 'or' ? count >= 1 : gate.type === 'and' ? count === gate.inputs.length : count >= gate.k);
    }
    if (failed[failed.length - 1]) total += weight;
  }
  return total;
}

describe('decision diagram properties (fast-check, seeded)', () => {
  it('P(top) from the diagram equals brute-force enumeration on random small trees (1e-12 absolute)', () => {
    fc.assert(
      fc.property(randomTree, (tree) => {
        const engine = new FaultTreeEngine(toModel(tree));
        const [value] = engine.topProbability(new Float64Array([500]));
        expect(Math.abs(value - bruteForce(tree))).toBeLessThan(1e-12);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });

  it('the order of a gate\'s inputs does not change the answer (1e-14 absolute)', () => {
    fc.assert(
      fc.property(randomTree, (tree) => {
        const [forward] = new FaultTreeEngine(toModel(tree)).topProbability(new Float64Array([1]));
        const [reversed] = new FaultTreeEngine(toModel(tree, true)).topProbability(new Float64Array([1]));
        expect(Math.abs(forward - reversed)).toBeLessThan(1e-14);
      }),
      { seed: SEED, numRuns: 200 },
    );
  });

  it('balanced combination: an OR of 1,000 AND pairs has the same 2,002 nodes whatever the input order', () => {
    const pairs = Array.from({ length: 1000 }, (_, i) => i);
    const sizes = [pairs, [...pairs].reverse(), pairs.map((_, i) => (i * 7919) % 1000)].map((order) => {
      const bdd = new Bdd(2000);
      const root = bdd.orAll(order.map((i) => bdd.and(bdd.variable(2 * i), bdd.variable(2 * i + 1))));
      return bdd.reachable(root).length;
    });
    // Rauzy 1993: with the pair-wise order the diagram of OR of n pairs has 2n internal nodes (+2 terminals).
    expect(sizes).toEqual([2002, 2002, 2002]);
  });
});

const votedArbitrary = fc.record({
  n: fc.integer({ min: 1, max: 4 }),
  kSeed: fc.nat(),
  lambdaDU: fc.double({ min: 1e-8, max: 1e-4, noNaN: true }),
  lambdaDD: fc.double({ min: 0, max: 1e-4, noNaN: true }),
  mttrHours: fc.double({ min: 0, max: 72, noNaN: true }),
  beta: fc.double({ min: 0, max: 0.2, noNaN: true }),
  periods: fc.integer({ min: 2, max: 6 }),
  stagger: fc.boolean(),
});

describe('PFD properties on random voted groups (fast-check, seeded)', () => {
  it('PFD(t) stays in [0, 1] and PFDavg lies between min and max of the curve', () => {
    fc.assert(
      fc.property(votedArbitrary, (v) => {
        const k = 1 + (v.kSeed % v.n);
        const { beta, ...rest } = v;
        const model = votedGroup(v.n, k, { ...rest, intervalHours: 4380, missionHours: 4380 * v.periods, ...(v.n > 1 ? { beta } : {}) });
        const result = solveModel(model, { timePoints: 50 });
        for (const value of result.curve.pfd) {
          expect(value).toBeGreaterThanOrEqual(0);
          expect(value).toBeLessThanOrEqual(1);
        }
        expect(result.pfdAvg).toBeLessThanOrEqual(result.pfdMax * (1 + 1e-12));
        expect(result.pfdAvg).toBeGreaterThanOrEqual(0);
      }),
      { seed: SEED, numRuns: 60 },
    );
  });

  it('PFDavg grows with the proof test interval (intervals dividing the mission)', () => {
    fc.assert(
      fc.property(votedArbitrary, fc.integer({ min: 1, max: 4 }), (v, extra) => {
        const k = 1 + (v.kSeed % v.n);
        const mission = 4380 * 12;
        const { beta, ...rest } = v;
        const solve = (divisions: number) =>
          solveModel(votedGroup(v.n, k, { ...rest, stagger: false, intervalHours: mission / divisions, missionHours: mission, ...(v.n > 1 ? { beta } : {}) }), { timePoints: 10 }).pfdAvg;
        const frequent = solve(12);
        const rare = solve(12 / [1, 2, 3, 4, 6][extra]);
        expect(rare).toBeGreaterThanOrEqual(frequent * (1 - 1e-9));
      }),
      { seed: SEED, numRuns: 40 },
    );
  });

  // Beta only raises PFDavg when two or more failures are needed (k >= 2): in a series (k = 1) group a
  // shared failure replaces several single failures, so more beta lowers it (common practice).
  it('PFDavg grows with every rate, and with beta when k >= 2', () => {
    fc.assert(
      fc.property(votedArbitrary, fc.constantFrom('lambdaDU', 'lambdaDD', 'beta'), fc.double({ min: 1.01, max: 5, noNaN: true }), (v, key, factor) => {
        const n = Math.max(2, v.n);
        const k = key === 'beta' ? 2 + (v.kSeed % (n - 1)) : 1 + (v.kSeed % n);
        const solve = (scaled: typeof v) =>
          solveModel(votedGroup(n, k, { ...scaled, intervalHours: 4380, missionHours: 4380 * v.periods }), { timePoints: 10 }).pfdAvg;
        const base = solve(v);
        const raised = solve({ ...v, [key]: key === 'beta' ? Math.min(1, v.beta * factor + 0.01) : v[key] * factor });
        expect(raised).toBeGreaterThanOrEqual(base * (1 - 1e-9));
      }),
      { seed: SEED, numRuns: 40 },
    );
  });
});

describe('a common-cause member is its own failure OR the shared event (brute force, 1e-12)', () => {
  it('2oo3 with a beta group at t = 3000 h', () => {
    const lambda = 2e-5;
    const beta = 0.1;
    const t = 3000;
    const model = votedGroup(3, 2, { lambdaDU: lambda, missionHours: 10000, beta });
    const [value] = new FaultTreeEngine(model).topProbability(new Float64Array([t]));
    const own = -Math.expm1(-(1 - beta) * lambda * t);
    const shared = -Math.expm1(-beta * lambda * t);
    const twoOfThree = 3 * own ** 2 * (1 - own) + own ** 3;
    expect(Math.abs(value - (shared + (1 - shared) * twoOfThree))).toBeLessThan(1e-12);
  });

  it('a shared failure is revealed by the earliest test of any member', () => {
    const lambda = 1e-5;
    const model = faultTree({
      missionHours: 10000,
      events: [channel('A', { lambdaDU: lambda, intervalHours: 4000, firstHours: 1000 }), channel('B', { lambdaDU: lambda, intervalHours: 4000, firstHours: 3000 })],
      gates: [{ id: 'TOP', type: 'and', inputs: ['A', 'B'] }],
      ccf: [{ id: 'CCF', members: ['A', 'B'], beta: 1, model: 'beta' }],
      top: 'TOP',
    });
    // beta = 1: only the shared event remains; it renews at 1000, 3000, 5000, 7000, 9000 h.
    const [value] = new FaultTreeEngine(model).topProbability(new Float64Array([3500]));
    expect(Math.abs(value - -Math.expm1(-lambda * 500))).toBeLessThan(1e-12);
  });
});
