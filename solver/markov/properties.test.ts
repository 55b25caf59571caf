import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { MarkovModel } from '../../shared/model-file.js';
import { generateModels } from '../generator/index.js';
import { solveMarkovModel } from './index.js';

const YEAR = 8760;

/** A random chain of 2-6 states with random rates (per hour) and one random test with valid rows. */
const randomChain = fc
  .record({
    size: fc.integer({ min: 2, max: 6 }),
    rates: fc.array(fc.double({ min: 1e-7, max: 0.05, noNaN: true }), { minLength: 36, maxLength: 36 }),
    present: fc.array(fc.boolean(), { minLength: 36, maxLength: 36 }),
    targets: fc.array(fc.nat(5), { minLength: 6, maxLength: 6 }),
    split: fc.double({ min: 0, max: 1, noNaN: true }),
    interval: fc.integer({ min: 100, max: 5000 }),
    down: fc.array(fc.boolean(), { minLength: 6, maxLength: 6 }),
  })
  .map(({ size, rates, present, targets, split, interval, down }): MarkovModel => {
    const ids = Array.from({ length: size }, (_, index) => `S${index}`);
    const transitions = [];
    for (let i = 0; i < size; i += 1) {
      for (let j = 0; j < size; j += 1) if (i !== j && present[i * 6 + j]) transitions.push({ from: ids[i], to: ids[j], rate: rates[i * 6 + j] });
    }
    const moves = ids.flatMap((id, index) => {
      const target = ids[targets[index] % size];
      return index % 2 === 0 ? [{ from: id, to: target, probability: 1 }] : [{ from: id, to: ids[0], probability: split }, { from: id, to: target === ids[0] ? ids[1] : target, probability: 1 - split }];
    });
    return {
      format: 'proofline/model',
      version: 1,
      name: 'random chain',
      kind: 'markov',
      mission: { hours: 20_000, demand: 'low' },
      states: ids.map((id, index) => ({ id, ...(index === 0 ? { initial: 1 } : {}), ...(down[index] ? { down: true } : {}) })),
      transitions,
      tests: [{ intervalHours: interval, moves }],
    };
  });

describe('Markov engine properties (fast-check, seeded)', () => {
  it('keeps every state probability in [0, 1] and their sum at 1 at every output time, all three methods', () => {
    // Invariants of a probability distribution; tolerances 1e-9 (sum, PFDavg bounds) and 1e-12 (each
    // probability's bounds).
    fc.assert(
      fc.property(randomChain, fc.constantFrom('dense' as const, 'uniformization' as const, 'krylov' as const), (chain, method) => {
        const result = solveMarkovModel(chain, { chainMethod: method, timePoints: 30 });
        const points = result.curve.hours.length;
        for (let point = 0; point < points; point += 1) {
          let sum = 0;
          for (const state of result.states!) {
            const value = state.probability[point];
            expect(value).toBeGreaterThanOrEqual(-1e-12);
            expect(value).toBeLessThanOrEqual(1 + 1e-12);
            sum += value;
          }
          expect(Math.abs(sum - 1)).toBeLessThan(1e-9);
          expect(result.curve.pfd[point]).toBeGreaterThanOrEqual(-1e-12);
          expect(result.curve.pfd[point]).toBeLessThanOrEqual(1 + 1e-12);
        }
        expect(result.pfdAvg).toBeGreaterThanOrEqual(-1e-9);
        expect(result.pfdAvg).toBeLessThanOrEqual(1 + 1e-9);
      }),
      { seed: 20261202, numRuns: 40 },
    );
  });

  const architecture = fc.record({
    lambdaDU: fc.double({ min: 1e-7, max: 1e-5, noNaN: true }),
    lambdaDD: fc.double({ min: 0, max: 1e-5, noNaN: true }),
    mttrHours: fc.double({ min: 1, max: 72, noNaN: true }),
    beta: fc.double({ min: 0, max: 0.2, noNaN: true }),
    voting: fc.constantFrom('1oo1', '1oo2', '2oo3'),
    tests: fc.integer({ min: 2, max: 20 }),
  });
  const pfdAvgOf = (spec: { lambdaDU: number; lambdaDD: number; mttrHours: number; beta: number; voting: string }, tests: number) => {
    const count = Number(spec.voting.slice(-1));
    const { markov } = generateModels({
      name: 'property',
      mission: { hours: 10 * YEAR, demand: 'low' },
      groups: [{ id: 'G', voting: spec.voting, beta: spec.beta, channels: { identical: { lambdaDU: spec.lambdaDU, lambdaDD: spec.lambdaDD, mttrHours: spec.mttrHours, proofTest: { intervalHours: (10 * YEAR) / tests } }, count } }],
    });
    return solveMarkovModel(markov, { includeStates: false, timePoints: 200 }).pfdAvg;
  };

  it('PFDavg grows with the proof test interval (intervals dividing the mission)', () => {
    // Common practice: a longer test interval leaves hidden failures undetected longer.
    fc.assert(
      fc.property(architecture, (spec) => {
        expect(pfdAvgOf(spec, spec.tests)).toBeGreaterThan(pfdAvgOf(spec, spec.tests + 1) * (1 - 1e-12));
      }),
      { seed: 7, numRuns: 25 },
    );
  });

  it('PFDavg grows with every rate and with the repair time', () => {
    // Common practice: more failures or longer repairs cannot make the function more available.
    fc.assert(
      fc.property(architecture, fc.constantFrom('lambdaDU', 'lambdaDD', 'mttrHours'), (spec, field) => {
        const higher = { ...spec, [field]: spec[field] * 1.5 + (field === 'lambdaDD' ? 1e-7 : 0) };
        expect(pfdAvgOf(higher, spec.tests)).toBeGreaterThan(pfdAvgOf(spec, spec.tests));
      }),
      { seed: 11, numRuns: 25 },
    );
  });
});
