import type { MarkovModel } from '../../shared/model-file.js';
import { silReached } from '../../shared/sil.js';
import type { SolveResult } from '../../shared/solve-result.js';
import { throwIfAborted } from '../common/abort.js';
import { ModelError } from '../common/model-error.js';
import type { SolveOptions } from '../solve-options.js';
import type { ChainSolution } from './chain-solution.js';
import { compileMarkovModel, type CompiledChain } from './compile-chain.js';
import { buildSchedule, scheduleHours, type Schedule } from './schedule.js';
import { denseCostEstimate, denseMemoryEstimate, solveChainDense } from './solve-chain-dense.js';
import { solveChainUniformization, uniformizationCostEstimate } from './solve-chain-uniformization.js';
import { krylovCostEstimate, krylovProbeCost, solveChainKrylov } from './solve-chain-krylov.js';

/** Version stamp of this engine, used when the caller does not pass one. */
export const MARKOV_ENGINE_VERSION = '1.0.0';

/** States' probabilities are returned while states x curve points stays at or below this. */
export const MAX_STATE_VALUES = 2_000_000;

/** A solve whose chosen method is estimated above this (ns; 10 minutes) is refused instead of hanging. */
export const MAX_ESTIMATED_NANOSECONDS = 6e11;
/** The Krylov method's trial (its cost estimate) runs only when the other methods are estimated above this (ns). */
export const KRYLOV_TRIAL_FLOOR = 5e7;
/** The dense method is only chosen while its matrices and per-step vectors hold at most this many values. */
export const MAX_DENSE_VALUES = 3e7;

/** Options of the Markov engine on top of the shared ones. */
export interface MarkovSolveOptions extends SolveOptions {
  /** Force a method instead of the cost estimate's choice (tests and benchmarks). */
  readonly chainMethod?: 'dense' | 'uniformization' | 'krylov';
  /** List each state's probability at the curve hours (default true, within MAX_STATE_VALUES). */
  readonly includeStates?: boolean;
  /** Stored in the result; default MARKOV_ENGINE_VERSION. */
  readonly solverVersion?: string;
}

/**
 * Solves a multi-phase Markov model: the transient distribution of each chain between tests, the test
 * moves applied at each test time, PFD(t) = probability of the down states on a grid holding every test
 * time, PFDavg as the exact integral of PFD(t), PFDmax, PFH (time-averaged frequency of the rate
 * transitions from up states into down states, except those marked `detected`; test moves are planned,
 * not failures, and do not count),
 * RRF = 1 / PFDavg and the SIL of IEC 61508-1 Tables 2 and 3.
 *
 * Each chain (the main chain and each independent part) is solved with the method of the lowest cost
 * estimate: dense Pade-13 propagators per distinct step (small and medium chains), uniformization on the
 * sparse generator (large chains of moderate stiffness), or Krylov steps on the sparse generator (large
 * stiff chains, where uniformization's Lambda t products are too many); each repeats a test phase instead
 * of propagating it again once the distribution after the tests matches the previous phase's start
 * (periodic regime). Parts are combined as a series of independent subsystems:
 * PFD = 1 - prod(1 - PFD_k), w = sum_k w_k prod_(j != k) (1 - PFD_j) (Rausand & Hoyland, System
 * Reliability Theory, 2nd ed., ch. 4 and 5: series structures of independent components). The first-order
 * sums integrate exactly; only the small cross terms are integrated by Simpson's rule on a grid of half
 * steps, and their error estimate is part of the stated error bound.
 */
export function solveMarkovModel(model: MarkovModel, options: MarkovSolveOptions = {}): SolveResult {
  const progress = options.onProgress ?? (() => undefined);
  const timePoints = options.timePoints ?? 1000;
  if (!Number.isInteger(timePoints) || timePoints < 2 || timePoints > 1_000_000) {
    throw new RangeError(`timePoints must be an integer from 2 to 1,000,000 (got ${timePoints})`);
  }
  throwIfAborted(options.signal);
  progress(0, 'checking the state model');
  const chains = compileMarkovModel(model);
  const missionHours = model.mission.hours;
  const combined = chains.length > 1;
  const schedule = buildSchedule(chains, missionHours, timePoints, combined ? 2 : 1);
  const outputPoints = combined ? (schedule.pointCount + schedule.segments.length) / 2 : schedule.pointCount;
  const totalStates = chains.reduce((sum, chain) => sum + chain.size, 0);
  const keepStates = (options.includeStates ?? true) && totalStates * outputPoints <= MAX_STATE_VALUES;
  const warnings: string[] = [];
  if ((options.includeStates ?? true) && !keepStates) {
    warnings.push(`the state probabilities are not listed: ${totalStates} states at ${outputPoints} times exceed ${MAX_STATE_VALUES.toLocaleString('en-US')} values`);
  }

  const solutions: ChainSolution[] = [];
  const descriptions: string[] = [];
  chains.forEach((chain, chainIndex) => {
    throwIfAborted(options.signal);
    const context = {
      chain,
      schedule,
      chainIndex,
      keepStates,
      signal: options.signal,
      progress: (fraction: number) => progress((chainIndex + fraction) / chains.length * 0.95, `solving ${chainLabel(chain, combined)}`),
    };
    const denseCost = denseMemoryEstimate(context) <= MAX_DENSE_VALUES ? denseCostEstimate(context) : Infinity;
    const sparseCost = uniformizationCostEstimate(context);
    // The Krylov estimate runs a trial of its own, worth it only where the other two are far dearer.
    const tryKrylov = Math.min(denseCost, sparseCost) > Math.max(KRYLOV_TRIAL_FLOOR, 4 * krylovProbeCost(chain));
    const krylovCost = !options.chainMethod && tryKrylov ? krylovCostEstimate(context) : Infinity;
    const costs = { dense: denseCost, uniformization: sparseCost, krylov: krylovCost };
    const cheapest = (Object.keys(costs) as (keyof typeof costs)[]).reduce((best, key) => (costs[key] < costs[best] ? key : best), 'dense');
    const method = options.chainMethod ?? cheapest;
    const estimate = costs[method];
    if (!options.chainMethod && estimate > MAX_ESTIMATED_NANOSECONDS) {
      throw new ModelError([
        {
          path: chainIndex === 0 ? ['states'] : ['parts', chainIndex - 1],
          message: `${chainLabel(chain, combined)} (${chain.size} states) would take about ${Math.round(estimate / 6e10)} minutes to solve (limit ${MAX_ESTIMATED_NANOSECONDS / 6e10} minutes): it is too large or too stiff over this mission; split it into independent parts, lower the number of states or shorten the mission`,
        },
      ]);
    }
    const solution = method === 'dense' ? solveChainDense(context) : method === 'krylov' ? solveChainKrylov(context) : solveChainUniformization(context);
    solutions.push(solution);
    const reason = options.chainMethod
      ? 'method forced by the caller'
      : `cost estimate ${formatMilliseconds(denseCost)} dense vs ${formatMilliseconds(sparseCost)} uniformization vs ${tryKrylov ? formatMilliseconds(krylovCost) : 'not tried (the others are cheap)'} Krylov`;
    descriptions.push(`${chainLabel(chain, combined)}, ${chain.size} states, ${chain.nonzeros} generator entries: ${solution.algorithm}; ${reason}`);
  });

  progress(0.96, 'combining');
  const summary = combined ? combineSeries(solutions, schedule) : single(solutions[0], schedule);
  const pfdAvg = summary.pfdIntegral / missionHours;
  const pfh = summary.frequencyIntegral / missionHours;
  let pfdMax = 0;
  for (const value of summary.pfd) pfdMax = Math.max(pfdMax, value);
  const measure = model.mission.demand === 'low' ? pfdAvg : pfh;
  const algorithm =
    (combined
      ? `${chains.length} independent parts in series as declared in the file (a part's transitions and tests reach only its own states), each solved on its own and combined exactly. `
      : 'one chain as given (independent parts are taken only as declared in "parts"; none are inferred from a flat state list). ') + descriptions.join('. ');

  const states = keepStates
    ? chains.flatMap((chain, chainIndex) =>
        chain.stateIds.map((id, state) => ({
          id: chainIndex === 0 ? id : `${chain.id}/${id}`,
          probability: Array.from(summary.pick(solutions[chainIndex].states![state])),
        })),
      )
    : undefined;
  progress(1, 'done');
  return {
    method: 'markov',
    algorithm,
    solverVersion: options.solverVersion ?? MARKOV_ENGINE_VERSION,
    demand: model.mission.demand,
    missionHours,
    pfdAvg,
    pfdMax,
    pfh,
    rrf: pfdAvg > 0 ? 1 / pfdAvg : Number.MAX_VALUE,
    sil: silReached(measure, model.mission.demand),
    curve: { hours: Array.from(summary.hours), pfd: Array.from(summary.pfd), frequency: Array.from(summary.frequency) },
    simplified: [],
    cutSets: [],
    importance: [],
    ...(states ? { states } : {}),
    warnings,
    errorBound: pfdAvg > 0 ? summary.integralErrorBound / summary.pfdIntegral : summary.integralErrorBound / missionHours,
  };
}

interface Summary {
  readonly hours: Float64Array;
  readonly pfd: Float64Array;
  /** w(t): the function's failure frequency (per hour) at the output points. */
  readonly frequency: Float64Array;
  readonly pfdIntegral: number;
  readonly frequencyIntegral: number;
  readonly integralErrorBound: number;
  /** The output points of a grid-long series. */
  readonly pick: (series: Float64Array) => Float64Array;
}

function single(solution: ChainSolution, schedule: Schedule): Summary {
  return {
    hours: scheduleHours(schedule),
    pfd: solution.pfd,
    frequency: solution.frequency,
    pfdIntegral: solution.pfdIntegral,
    frequencyIntegral: solution.frequencyIntegral,
    integralErrorBound: solution.integralErrorBound,
    pick: (series) => series,
  };
}

/**
 * Series combination on the half-step grid. The exact first-order integrals (sum of the parts' integrals)
 * are corrected by the integral of the cross terms sum_k u_k - (1 - prod(1 - u_k)), by Simpson's rule on
 * each pair of half steps; |Simpson - trapezoid| over the same points bounds its error (common practice).
 */
function combineSeries(solutions: readonly ChainSolution[], schedule: Schedule): Summary {
  const hours = scheduleHours(schedule);
  const count = schedule.pointCount;
  const pfd = new Float64Array(count);
  const frequency = new Float64Array(count);
  const crossPfd = new Float64Array(count);
  const crossFrequency = new Float64Array(count);
  for (let point = 0; point < count; point += 1) {
    let survive = 1;
    let sum = 0;
    for (const solution of solutions) {
      survive *= 1 - solution.pfd[point];
      sum += solution.pfd[point];
    }
    pfd[point] = 1 - survive;
    crossPfd[point] = sum - pfd[point];
    let frequencySum = 0;
    let frequencySeries = 0;
    solutions.forEach((solution, k) => {
      let othersUp = 1;
      solutions.forEach((other, j) => {
        if (j !== k) othersUp *= 1 - other.pfd[point];
      });
      frequencySum += solution.frequency[point];
      frequencySeries += solution.frequency[point] * othersUp;
    });
    frequency[point] = frequencySeries;
    crossFrequency[point] = frequencySum - frequencySeries;
  }
  let crossPfdIntegral = 0;
  let crossFrequencyIntegral = 0;
  let crossError = 0;
  const keep: number[] = [];
  let first = 0;
  for (const segment of schedule.segments) {
    const half = (segment.end - segment.start) / segment.steps;
    for (let step = 0; step < segment.steps; step += 2) {
      const a = first + step;
      const simpson = (half / 3) * (crossPfd[a] + 4 * crossPfd[a + 1] + crossPfd[a + 2]);
      const trapezoid = (half / 2) * (crossPfd[a] + 2 * crossPfd[a + 1] + crossPfd[a + 2]);
      crossPfdIntegral += simpson;
      crossError += Math.abs(simpson - trapezoid);
      crossFrequencyIntegral += (half / 3) * (crossFrequency[a] + 4 * crossFrequency[a + 1] + crossFrequency[a + 2]);
    }
    for (let step = 0; step <= segment.steps; step += 2) keep.push(first + step);
    first += segment.steps + 1;
  }
  const pick = (series: Float64Array) => Float64Array.from(keep, (point) => series[point]);
  return {
    hours: pick(hours),
    pfd: pick(pfd),
    frequency: pick(frequency),
    pfdIntegral: solutions.reduce((sum, solution) => sum + solution.pfdIntegral, 0) - crossPfdIntegral,
    frequencyIntegral: solutions.reduce((sum, solution) => sum + solution.frequencyIntegral, 0) - crossFrequencyIntegral,
    integralErrorBound: solutions.reduce((sum, solution) => sum + solution.integralErrorBound, 0) + crossError,
    pick,
  };
}

function chainLabel(chain: CompiledChain, combined: boolean): string {
  return combined ? `part "${chain.id === 'main' ? 'main' : chain.id}"` : 'chain';
}

function formatMilliseconds(nanoseconds: number): string {
  if (!Number.isFinite(nanoseconds)) return 'too large for it';
  const milliseconds = nanoseconds / 1e6;
  return milliseconds < 1 ? `${milliseconds.toFixed(2)} ms` : `${milliseconds.toPrecision(3)} ms`;
}
