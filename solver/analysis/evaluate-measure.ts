import type { ModelFile } from '../../shared/model-file.js';
import { FaultTreeEngine } from '../fault-tree/engine.js';
import { solveMarkovModel } from '../markov/index.js';

/** The measure a function is judged by: PFDavg in low demand, PFH otherwise (IEC 61508-1:2010 7.6.2.9). */
export type DemandMeasure = 'pfdAvg' | 'pfh';

export function measureOfDemand(model: ModelFile): DemandMeasure {
  return model.mission.demand === 'low' ? 'pfdAvg' : 'pfh';
}

/** A target on the demand measure: met below the limit, or at it too when inclusive (shared/api/sif-target.ts). */
export interface MeasureTarget {
  readonly limit: number;
  readonly inclusive: boolean;
}

export function meetsTarget(value: number, target: MeasureTarget): boolean {
  return target.inclusive ? value <= target.limit : value < target.limit;
}

/**
 * PFDavg or PFH of a model by its exact engine, without what the full solve adds. A fault tree: the
 * decision diagram with the adaptive Gauss-Kronrod integral, no curve, cut sets or importance. A state
 * model: the Markov engine on its coarsest output grid (2 points) without state listings; its PFDavg and
 * PFH integrate every phase between tests exactly whatever the grid (solver/markov/solve-markov-model.ts).
 */
export function evaluateMeasure(model: ModelFile, signal?: AbortSignal): number {
  const measure = measureOfDemand(model);
  if (model.kind === 'markov') {
    const result = solveMarkovModel(model, { timePoints: 2, includeStates: false, signal });
    return measure === 'pfdAvg' ? result.pfdAvg : result.pfh;
  }
  const engine = new FaultTreeEngine(model, { signal });
  return measure === 'pfdAvg' ? engine.pfdAverage().pfdAvg : engine.pfhAdaptive().pfh;
}

/** Options of the analyses that solve a model many times. */
export interface RepeatedSolveOptions {
  readonly signal?: AbortSignal;
  /** Called after each solve with the fraction done. */
  readonly onProgress?: (fraction: number) => void;
  /** Awaited between solves, so a caller on a user interface thread can let it paint. Default none. */
  readonly pause?: () => Promise<void>;
}
