import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { markovIssues, type MarkovModel } from './model-file.js';

function chain(fields: Pick<MarkovModel, 'states' | 'transitions'> & Partial<MarkovModel>): MarkovModel {
  return { format: 'proofline/model', version: 1, name: 'checks', kind: 'markov', mission: { hours: 1000, demand: 'low' }, ...fields };
}

/**
 * The rules of docs/model-format.md written the plain way (string keys, one pass per rule), as the
 * reference the linear check must agree with. A repeat is only counted between known states (an unknown
 * state is reported on its own).
 */
function plainIssues(model: MarkovModel): string[] {
  const messages: string[] = [];
  const ids = new Set(model.states.map((state) => state.id));
  const pairs = new Map<string, number>();
  model.transitions.forEach((transition, index) => {
    if (!ids.has(transition.from)) messages.push(`transitions.${index}.from`);
    if (!ids.has(transition.to)) messages.push(`transitions.${index}.to`);
    if (transition.from === transition.to) messages.push(`transitions.${index}.to self`);
    const key = `${transition.from}>${transition.to}`;
    if (!ids.has(transition.from) || !ids.has(transition.to)) return;
    if (pairs.has(key)) messages.push(`transitions.${index} repeats ${pairs.get(key)}`);
    else pairs.set(key, index);
  });
  (model.tests ?? []).forEach((test, testIndex) => {
    const sums = new Map<string, number>();
    test.moves.forEach((move, moveIndex) => {
      if (!ids.has(move.from)) messages.push(`tests.${testIndex}.moves.${moveIndex}.from`);
      if (!ids.has(move.to)) messages.push(`tests.${testIndex}.moves.${moveIndex}.to`);
      sums.set(move.from, (sums.get(move.from) ?? 0) + move.probability);
    });
    for (const [from, sum] of sums) if (ids.has(from) && Math.abs(sum - 1) > 1e-9) messages.push(`tests.${testIndex} row ${from}`);
  });
  return messages.sort();
}

function issueKeys(model: MarkovModel): string[] {
  return markovIssues(model)
    .map((issue) => {
      const path = issue.path.join('.');
      if (/repeats/.test(issue.message)) return `${path} repeats ${/also transitions\[(\d+)\]/.exec(issue.message)![1]}`;
      if (/same state/.test(issue.message)) return `${path} self`;
      if (/moves out of/.test(issue.message)) return `tests.${issue.path[1]} row ${/out of "([^"]+)"/.exec(issue.message)![1]}`;
      return path;
    })
    .sort();
}

describe('state model checks (markovIssues)', () => {
  it('names a repeated transition with the first one, unknown states, self transitions and bad test rows', () => {
    // Rules of issue 4 and docs/model-format.md: unknown states, rates into the same state, probabilities
    // of a test row not summing to 1 are errors; a repeated from -> to pair is refused as ambiguous.
    const issues = markovIssues(
      chain({
        states: [{ id: 'A', initial: 1 }, { id: 'B' }, { id: 'C', down: true }],
        transitions: [
          { from: 'A', to: 'B', rate: 1e-6 },
          { from: 'B', to: 'C', rate: 1e-6 },
          { from: 'A', to: 'B', rate: 2e-6 },
          { from: 'C', to: 'C', rate: 1 },
          { from: 'X', to: 'A', rate: 1 },
        ],
        tests: [
          { intervalHours: 100, moves: [{ from: 'B', to: 'A', probability: 0 }, { from: 'C', to: 'A', probability: 1 }] },
          { intervalHours: 200, moves: [{ from: 'B', to: 'A', probability: 0.5 }, { from: 'B', to: 'C', probability: 0.5 }, { from: 'C', to: 'B', probability: 0.7 }] },
        ],
      }),
    ).map((issue) => `${issue.path.join('.')}: ${issue.message}`);
    expect(issues).toEqual([
      'transitions.2: transition 2 repeats "A" -> "B" (also transitions[0])',
      'transitions.3.to: transition 3 goes from "C" into the same state',
      'transitions.4.from: transition 4 refers to unknown state "X"',
      'tests.0.moves: test 0: the moves out of "B" sum to 0, not 1',
      'tests.1.moves: test 1: the moves out of "C" sum to 0.7, not 1',
    ]);
  });

  it('agrees with the plain string-keyed rules on random chains (fast-check, seeded)', () => {
    const id = fc.constantFrom('A', 'B', 'C', 'D', 'E');
    fc.assert(
      fc.property(
        fc.array(fc.record({ from: id, to: id }), { maxLength: 25 }),
        fc.array(fc.array(fc.record({ from: id, to: id, probability: fc.constantFrom(0, 0.25, 0.5, 1) }), { minLength: 1, maxLength: 6 }), { maxLength: 3 }),
        (transitions, tests) => {
          const model = chain({
            states: ['A', 'B', 'C', 'D'].map((state, index) => ({ id: state, ...(index === 0 ? { initial: 1 } : {}) })),
            transitions: transitions.map((transition) => ({ ...transition, rate: 1e-6 })),
            tests: tests.map((moves) => ({ intervalHours: 100, moves })),
          });
          expect(issueKeys(model)).toEqual(plainIssues(model));
        },
      ),
      { seed: 20261202, numRuns: 300 },
    );
  });
});
