import { isProbabilityEvent, type FaultTreeModel } from '../../shared/model-file.js';
import { throwIfAborted } from '../common/abort.js';
import { createRandomStream, type RandomStream } from '../random/index.js';
import { evaluateMeasure, meetsTarget, type MeasureTarget, type RepeatedSolveOptions } from './evaluate-measure.js';

/** Error factor of an event that states none (common practice for generic failure-rate data: 3). */
export const DEFAULT_ERROR_FACTOR = 3;

/** The standard normal 95th percentile, z = 1.6449 (any normal table). */
export const NORMAL_95 = 1.6448536269514722;

/**
 * Sigma of ln(lambda) for a lognormal with error factor EF = x95 / x50, so sigma = ln(EF) / z95
 * (Rausand & Hoyland, System Reliability Theory 2nd ed., lognormal distribution, from memory; the
 * definition of the error factor used in PRA data handbooks).
 */
export function lognormalSigma(errorFactor: number): number {
  if (!(errorFactor >= 1)) throw new RangeError(`an error factor is 1 or more (got ${errorFactor})`);
  return Math.log(errorFactor) / NORMAL_95;
}

/** A standard normal variate by the Box-Muller transform (Box and Muller, Ann. Math. Stat. 29, 1958). */
export function standardNormal(random: RandomStream): number {
  const u = 1 - random.next();
  const v = random.next();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

/** The p-quantile of sorted values by linear interpolation between order statistics (Hyndman and Fan type 7). */
export function quantile(sorted: ArrayLike<number>, p: number): number {
  if (sorted.length === 0) return Number.NaN;
  const position = (sorted.length - 1) * p;
  const below = Math.floor(position);
  const above = Math.min(sorted.length - 1, below + 1);
  return sorted[below] + (sorted[above] - sorted[below]) * (position - below);
}

export interface UncertaintyOptions extends RepeatedSolveOptions {
  readonly target: MeasureTarget;
  /** Sampled models. Default 500. */
  readonly samples?: number;
  /** Seed of the random stream (solver/random). Default 1. */
  readonly seed?: number;
}

export interface UncertaintyResult {
  readonly samples: number;
  readonly seed: number;
  readonly p05: number;
  readonly p50: number;
  readonly p95: number;
  readonly mean: number;
  /** Fraction of the sampled models that meet the target. */
  readonly probabilityMeetingTarget: number;
  /** The error factor used per event id. */
  readonly errorFactors: Readonly<Record<string, number>>;
  /** The sampled measures, sorted. */
  readonly values: Float64Array;
}

/**
 * Failure-rate uncertainty: each rate event's rates (lambdaDU, lambdaDD, lambdaS) are multiplied by one
 * lognormal factor with median 1 and the event's error factor (the stated rates are the medians), the
 * events independent; each sampled model is solved exactly. Gives the 5 / 50 / 95 % values of the
 * demand measure and the probability of meeting the target. Seeded: the same seed gives the same result.
 */
export async function rateUncertainty(model: FaultTreeModel, options: UncertaintyOptions): Promise<UncertaintyResult> {
  const samples = options.samples ?? 500;
  const seed = options.seed ?? 1;
  if (!Number.isInteger(samples) || samples < 10 || samples > 100_000) throw new RangeError(`samples must be a whole number from 10 to 100000 (got ${samples})`);
  const random = createRandomStream(seed);
  const errorFactors: Record<string, number> = {};
  const sigmas = model.events.map((event) => {
    if (isProbabilityEvent(event)) return 0;
    const errorFactor = event.errorFactor ?? DEFAULT_ERROR_FACTOR;
    errorFactors[event.id] = errorFactor;
    return lognormalSigma(errorFactor);
  });
  const values = new Float64Array(samples);
  let met = 0;
  for (let sample = 0; sample < samples; sample++) {
    const events = model.events.map((event, index) => {
      if (isProbabilityEvent(event)) return event;
      const multiplier = Math.exp(sigmas[index] * standardNormal(random));
      return {
        ...event,
        lambdaDU: event.lambdaDU * multiplier,
        lambdaDD: event.lambdaDD === undefined ? undefined : event.lambdaDD * multiplier,
        lambdaS: event.lambdaS === undefined ? undefined : event.lambdaS * multiplier,
      };
    });
    const value = evaluateMeasure({ ...model, events }, options.signal);
    values[sample] = value;
    if (meetsTarget(value, options.target)) met++;
    options.onProgress?.((sample + 1) / samples);
    await options.pause?.();
    throwIfAborted(options.signal);
  }
  values.sort();
  const mean = values.reduce((sum, value) => sum + value, 0) / samples;
  return {
    samples,
    seed,
    p05: quantile(values, 0.05),
    p50: quantile(values, 0.5),
    p95: quantile(values, 0.95),
    mean,
    probabilityMeetingTarget: met / samples,
    errorFactors,
    values,
  };
}
