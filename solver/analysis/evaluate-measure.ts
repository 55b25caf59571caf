import type { FaultTreeModel } from '../../shared/model-file.js';
import { FaultTreeEngine } from '../fault-tree/engine.js';

/** The measure a function is judged by: PFDavg in low demand, PFH otherwise (IEC 61508-1:2010 7.6.2.9). */
export type DemandMeasure = 'pfdAvg' | 'pfh';

export function measureOfDemand(model: FaultTreeModel): DemandMeasure {
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
 * PFDavg or PFH of a fault tree by the exact engine (decision diagram, adaptive Gauss-Kronrod), without
 * the curve, cut sets or importance the full solve adds.
 */
export function evaluateMeasure(model: FaultTreeModel, signal?: AbortSignal): number {
  const engine = new FaultTreeEngine(model, { signal });
  return measureOfDemand(model) === 'pfdAvg' ? engine.pfdAverage().pfdAvg : engine.pfhAdaptive().pfh;
}

/** Options of the analyses that solve a model many times. */
export interface RepeatedSolveOptions {
  readonly signal?: AbortSignal;
  /** Called after each solve with the fraction done. */
  readonly onProgress?: (fraction: number) => void;
  /** Awaited between solves, so a caller on a user interface thread can let it paint. Default none. */
  readonly pause?: () => Promise<void>;
}
