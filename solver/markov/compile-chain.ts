import { markovIssues, type MarkovModel, type MarkovPart } from '../../shared/model-file.js';
import { ModelError, type ModelIssue } from '../common/model-error.js';

/** Largest model accepted: transitions plus one diagonal entry per state, summed over all parts. */
export const MAX_NONZEROS = 2_000_000;

/** A test of a chain: its times within the mission and its move rows (source -> targets, probabilities). */
export interface CompiledTest {
  readonly times: readonly number[];
  readonly sources: Int32Array;
  readonly rowStart: Int32Array;
  readonly targets: Int32Array;
  readonly probabilities: Float64Array;
}

/**
 * One chain in solver form. The generator Q is stored by column (for each target state, the states that
 * flow into it and their rates), so a row vector times Q is a gather; the diagonal is -exitRate.
 */
export interface CompiledChain {
  readonly id: string;
  readonly stateIds: readonly string[];
  readonly size: number;
  readonly initial: Float64Array;
  /** 1 where the function cannot act on a demand. */
  readonly down: Float64Array;
  readonly inStart: Int32Array;
  readonly inSource: Int32Array;
  readonly inRate: Float64Array;
  readonly exitRate: Float64Array;
  /** For an up state, its total rate into down states by undetected failures (what PFH counts); 0 when down. */
  readonly downFlowRate: Float64Array;
  readonly tests: readonly CompiledTest[];
  readonly nonzeros: number;
}

type Chain = Pick<MarkovPart, 'states' | 'transitions' | 'tests'>;

/**
 * Checks a state model (the shared reference checks plus what the solver needs: finite non-negative rates,
 * probabilities in [0, 1], the size cap) and compiles the main chain and each part. Throws ModelError
 * listing every problem with its path in the file.
 */
export function compileMarkovModel(model: MarkovModel): CompiledChain[] {
  const problems: ModelIssue[] = [];
  const chains: { id: string; chain: Chain; path: readonly (string | number)[] }[] = [
    { id: 'main', chain: model, path: [] },
    ...(model.parts ?? []).map((part, index) => ({ id: part.id, chain: part, path: ['parts', index] })),
  ];
  let nonzeros = 0;
  for (const { chain, path } of chains) {
    if (!Array.isArray(chain.states) || !Array.isArray(chain.transitions)) {
      problems.push({ path, message: 'a chain needs "states" and "transitions" lists' });
      continue;
    }
    nonzeros += chain.states.length + chain.transitions.length;
    chain.transitions.forEach((transition, index) => {
      if (typeof transition.rate !== 'number' || !Number.isFinite(transition.rate) || transition.rate < 0) {
        problems.push({ path: [...path, 'transitions', index, 'rate'], message: `the rate must be a finite number >= 0 per hour, got ${String(transition.rate)}` });
      }
    });
    chain.states.forEach((state, index) => {
      if (state.initial !== undefined && !(state.initial >= 0 && state.initial <= 1)) {
        problems.push({ path: [...path, 'states', index, 'initial'], message: `the initial probability must lie in [0, 1], got ${String(state.initial)}` });
      }
    });
    (chain.tests ?? []).forEach((test, testIndex) => {
      if (!(test.intervalHours > 0) || !Number.isFinite(test.intervalHours)) {
        problems.push({ path: [...path, 'tests', testIndex, 'intervalHours'], message: `the test interval must be a positive number of hours` });
      }
      test.moves.forEach((move, moveIndex) => {
        if (!(move.probability >= 0 && move.probability <= 1)) {
          problems.push({ path: [...path, 'tests', testIndex, 'moves', moveIndex, 'probability'], message: `a move probability must lie in [0, 1], got ${String(move.probability)}` });
        }
      });
    });
  }
  if (nonzeros > MAX_NONZEROS) {
    problems.push({ path: [], message: `the model has ${nonzeros.toLocaleString('en-US')} generator entries (states + transitions); the Markov engine accepts at most ${MAX_NONZEROS.toLocaleString('en-US')}` });
  }
  if (!(model.mission?.hours > 0) || !Number.isFinite(model.mission.hours)) {
    problems.push({ path: ['mission', 'hours'], message: 'the mission must last a positive number of hours' });
  }
  if (problems.length > 0) throw new ModelError(problems);
  const referenceIssues = markovIssues(model);
  if (referenceIssues.length > 0) throw new ModelError(referenceIssues);
  return chains.map(({ id, chain }) => compileChain(id, chain, model.mission.hours));
}

function compileChain(id: string, chain: Chain, missionHours: number): CompiledChain {
  const size = chain.states.length;
  const index = new Map(chain.states.map((state, position) => [state.id, position]));
  const initial = new Float64Array(size);
  const down = new Float64Array(size);
  chain.states.forEach((state, position) => {
    initial[position] = state.initial ?? 0;
    down[position] = state.down ? 1 : 0;
  });
  const exitRate = new Float64Array(size);
  const downFlowRate = new Float64Array(size);
  const inCount = new Int32Array(size + 1);
  const live = chain.transitions.filter((transition) => transition.rate > 0);
  for (const transition of live) inCount[index.get(transition.to)! + 1] += 1;
  for (let position = 0; position < size; position += 1) inCount[position + 1] += inCount[position];
  const inStart = Int32Array.from(inCount);
  const fill = Int32Array.from(inCount.subarray(0, size));
  const inSource = new Int32Array(live.length);
  const inRate = new Float64Array(live.length);
  for (const transition of live) {
    const from = index.get(transition.from)!;
    const to = index.get(transition.to)!;
    const slot = fill[to];
    fill[to] += 1;
    inSource[slot] = from;
    inRate[slot] = transition.rate;
    exitRate[from] += transition.rate;
    if (down[from] === 0 && down[to] === 1 && !transition.detected) downFlowRate[from] += transition.rate;
  }
  const tests = (chain.tests ?? []).map((test) => compileTest(test, index, missionHours));
  return {
    id,
    stateIds: chain.states.map((state) => state.id),
    size,
    initial,
    down,
    inStart,
    inSource,
    inRate,
    exitRate,
    downFlowRate,
    tests,
    nonzeros: live.length + size,
  };
}

function compileTest(
  test: NonNullable<Chain['tests']>[number],
  index: Map<string, number>,
  missionHours: number,
): CompiledTest {
  const times: number[] = [];
  const first = test.firstHours ?? test.intervalHours;
  for (let count = 0; ; count += 1) {
    const time = first + count * test.intervalHours;
    if (time >= missionHours * (1 - 1e-12)) break;
    times.push(time);
  }
  const bySource = new Map<number, { target: number; probability: number }[]>();
  for (const move of test.moves) {
    const source = index.get(move.from)!;
    const row = bySource.get(source) ?? [];
    row.push({ target: index.get(move.to)!, probability: move.probability });
    bySource.set(source, row);
  }
  const sources = Int32Array.from([...bySource.keys()]);
  const rowStart = new Int32Array(sources.length + 1);
  const targets: number[] = [];
  const probabilities: number[] = [];
  sources.forEach((source, row) => {
    for (const move of bySource.get(source)!) {
      targets.push(move.target);
      probabilities.push(move.probability);
    }
    rowStart[row + 1] = targets.length;
  });
  return {
    times,
    sources,
    rowStart,
    targets: Int32Array.from(targets),
    probabilities: Float64Array.from(probabilities),
  };
}

/** Applies a test's moves to a distribution in place (states without a move row stay where they are). */
export function applyTest(test: CompiledTest, distribution: Float64Array): void {
  const moved = new Float64Array(test.sources.length);
  test.sources.forEach((source, row) => {
    moved[row] = distribution[source];
    distribution[source] = 0;
  });
  test.sources.forEach((_, row) => {
    for (let slot = test.rowStart[row]; slot < test.rowStart[row + 1]; slot += 1) {
      distribution[test.targets[slot]] += moved[row] * test.probabilities[slot];
    }
  });
}
