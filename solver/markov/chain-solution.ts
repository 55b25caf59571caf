import type { CompiledChain } from './compile-chain.js';
import type { Schedule } from './schedule.js';

/** What a chain solver returns on the schedule's grid. */
export interface ChainSolution {
  /** PFD(t): probability of the down states at each grid point. */
  readonly pfd: Float64Array;
  /** Failure frequency w(t): probability flow per hour from up states into down states, per grid point. */
  readonly frequency: Float64Array;
  /** Exact integral of PFD(t) over the mission (hours). */
  readonly pfdIntegral: number;
  /** Exact integral of w(t) over the mission (expected number of up-to-down transitions). */
  readonly frequencyIntegral: number;
  /** Each state's probability at each grid point, when asked for. */
  readonly states?: Float64Array[];
  /** Bound on the absolute error of pfdIntegral (hours). */
  readonly integralErrorBound: number;
  readonly algorithm: string;
}

export interface ChainSolveContext {
  readonly chain: CompiledChain;
  readonly schedule: Schedule;
  readonly chainIndex: number;
  readonly keepStates: boolean;
  readonly signal?: AbortSignal;
  /** Reports this chain's own progress in [0, 1]. */
  readonly progress: (fraction: number) => void;
}

export function dot(a: Float64Array, b: Float64Array): number {
  let sum = 0;
  for (let index = 0; index < a.length; index += 1) sum += a[index] * b[index];
  return sum;
}
