import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Gate } from '../../shared/model-file.js';
import { FaultTreeEngine } from './engine.js';
import { faultTree } from './test-models.js';

// Fixed seed so that a failure can be replayed.
const SEED = 20261205;

interface RandomTree {
  events: number;
  gates: { type: 'or' | 'and' | 'atLeast'; k: number; inputs: number[] }[];
}

/** Random DAGs: gate g draws inputs among the events and the gates before it; the last gate is the top. */
const randomTree: fc.Arbitrary<RandomTree> = fc
  .record({
    events: fc.integer({ min: 2, max: 8 }),
    seeds: fc.array(fc.tuple(fc.constantFrom('or', 'and', 'atLeast'), fc.integer({ min: 1, max: 6 }), fc.array(fc.nat(), { minLength: 1, maxLength: 5 })), { minLength: 1, maxLength: 6 }),
  })
  .map(({ events, seeds }) => {
    const gates: RandomTree['gates'] = seeds.map(([type, kSeed, picks], g) => {
      const inputs = [...new Set(picks.map((pick) => pick % (events + g)))];
      if (g > 0 && !inputs.includes(events + g - 1)) inputs.push(events + g - 1);
      return { type: type as 'or' | 'and' | 'atLeast', k: 1 + (kSeed % inputs.length), inputs };
    });
    return { events, gates };
  });

function toModel(tree: RandomTree) {
  const name = (index: number) => (index < tree.events ? `E${index}` : `G${index - tree.events}`);
  const gates: Gate[] = tree.gates.map((gate, index) => ({
    id: `G${index}`,
    type: gate.type,
    ...(gate.type === 'atLeast' ? { k: gate.k } : {}),
    inputs: gate.inputs.map(name),
  }));
  return faultTree({
    missionHours: 100,
    events: Array.from({ length: tree.events }, (_, index) => ({ id: `E${index}`, probability: 0.1 })),
    gates,
    top: `G${tree.gates.length - 1}`,
  });
}

/** Whether the top fails with exactly the events of the mask failed (the gates evaluated directly). */
function topFails(tree: RandomTree, mask: number): boolean {
  const failed: boolean[] = Array.from({ length: tree.events }, (_, e) => ((mask >> e) & 1) === 1);
  for (const gate of tree.gates) {
    const count = gate.inputs.filter((input) => failed[input]).length;
    failed.push(gate.type === 'or' ? count >= 1 : gate.type === 'and' ? count === gate.inputs.length : count >= gate.k);
  }
  return failed[failed.length - 1];
}

/**
 * Minimal cut sets by brute force: the failing event sets none of whose one-smaller subsets fails (for
 * a coherent tree that is the definition of a minimal cut set; Vesely et al., Fault Tree Handbook,
 * NUREG-0492, chapter VII).
 */
function bruteForce(tree: RandomTree): string[] {
  const sets: string[] = [];
  for (let mask = 0; mask < 1 << tree.events; mask++) {
    if (!topFails(tree, mask)) continue;
    let minimal = true;
    for (let e = 0; e < tree.events && minimal; e++) if ((mask >> e) & 1 && topFails(tree, mask & ~(1 << e))) minimal = false;
    if (minimal) sets.push(Array.from({ length: tree.events }, (_, e) => e).filter((e) => (mask >> e) & 1).join('+'));
  }
  return sets.sort();
}

const names = (sets: Int32Array[]) => sets.map((set) => Array.from(set).join('+')).sort();

describe('minimal cut sets from the decision diagram (Rauzy 1993 minimal solutions, fast-check, seeded)', () => {
  it('equal brute-force enumeration on random small trees, with and without modules', () => {
    fc.assert(
      fc.property(randomTree, fc.boolean(), (tree, modular) => {
        const engine = new FaultTreeEngine(toModel(tree), { modular });
        const means = new Float64Array(tree.events).fill(0.1);
        const result = engine.cutSets(means, { cutoff: 0, maxOrder: tree.events });
        expect(result.complete).toBe(true);
        expect(result.truncated).toBe(false);
        expect(names(result.sets)).toEqual(bruteForce(tree));
      }),
      { seed: SEED, numRuns: 300 },
    );
  });

  it('the order cap and the cutoff leave out exactly the sets beyond them, and say so', () => {
    fc.assert(
      fc.property(randomTree, fc.integer({ min: 1, max: 3 }), (tree, maxOrder) => {
        const engine = new FaultTreeEngine(toModel(tree));
        // Mean 0.1 per event: a set of order m has the product 10^-m; a cutoff of 10^-(maxOrder - 0.5) keeps orders < maxOrder.
        const means = new Float64Array(tree.events).fill(0.1);
        const all = bruteForce(tree);
        const byOrder = engine.cutSets(means, { cutoff: 0, maxOrder });
        const expected = all.filter((set) => set.split('+').length <= maxOrder);
        expect(names(byOrder.sets)).toEqual(expected);
        expect(byOrder.truncated).toBe(expected.length < all.length);
        const byCutoff = engine.cutSets(means, { cutoff: 10 ** -(maxOrder - 0.5), maxOrder: tree.events });
        const kept = all.filter((set) => set.split('+').length < maxOrder);
        expect(names(byCutoff.sets)).toEqual(kept);
        expect(byCutoff.truncated).toBe(kept.length < all.length);
      }),
      { seed: SEED, numRuns: 200 },
    );
  });

  it('raises the cutoff tenfold while more than maxSets sets pass it, and reports the cutoff used', () => {
    // OR of 12 events: 12 sets of order 1 with means 10^-1 .. 10^-12; at most 5 sets keeps 10^-1 .. 10^-5.
    const model = faultTree({
      missionHours: 100,
      events: Array.from({ length: 12 }, (_, index) => ({ id: `E${index}`, probability: 0.1 })),
      gates: [{ id: 'TOP', type: 'or', inputs: Array.from({ length: 12 }, (_, index) => `E${index}`) }],
      top: 'TOP',
    });
    const engine = new FaultTreeEngine(model);
    const means = Float64Array.from({ length: 12 }, (_, index) => 10 ** -(index + 1));
    const result = engine.cutSets(means, { cutoff: 1e-13, maxSets: 5 });
    expect(result.sets).toHaveLength(5);
    expect(result.cutoff).toBeGreaterThan(1e-13);
    expect(result.truncated).toBe(true);
    expect(names(result.sets)).toEqual(['0', '1', '2', '3', '4']);
  });
});
