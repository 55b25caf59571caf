import { isProbabilityEvent, type FaultTreeModel, type MarkovModel, type MarkovTransition, type ModelFile } from '../../shared/model-file.js';
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
  /** The error factor used per sampled item: event id (fault tree) or transition label (state model). */
  readonly errorFactors: Readonly<Record<string, number>>;
  /** The sampled measures, sorted. */
  readonly values: Float64Array;
}

/** One sampled model per call of `next`, and the error factor used per sampled item. */
interface ModelSampler {
  readonly errorFactors: Readonly<Record<string, number>>;
  next(random: RandomStream): ModelFile;
}

function faultTreeSampler(model: FaultTreeModel): ModelSampler {
  const errorFactors: Record<string, number> = {};
  const sigmas = model.events.map((event) => {
    if (isProbabilityEvent(event)) return 0;
    const errorFactor = event.errorFactor ?? DEFAULT_ERROR_FACTOR;
    errorFactors[event.id] = errorFactor;
    return lognormalSigma(errorFactor);
  });
  return {
    errorFactors,
    next(random) {
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
      return { ...model, events };
    },
  };
}

/**
 * A state model file states no error factors, so every rate gets DEFAULT_ERROR_FACTOR. Transitions of
 * one chain with the same label share one factor: a label such as "DU failure" names one failure mode
 * that the chain counts in several states (2 lambda out of OK, lambda out of one-failed), and sampling
 * those apart would treat one device's rate as several independent ones. Unlabelled transitions get a
 * factor each.
 */
function markovSampler(model: MarkovModel): ModelSampler {
  const sigma = lognormalSigma(DEFAULT_ERROR_FACTOR);
  const errorFactors: Record<string, number> = {};
  const chains = [{ prefix: '', transitions: model.transitions }, ...(model.parts ?? []).map((part) => ({ prefix: `${part.id}: `, transitions: part.transitions }))];
  const groupsOf = chains.map(({ prefix, transitions }) =>
    transitions.map((transition) => {
      const group = `${prefix}${transition.label ?? `${transition.from} -> ${transition.to}`}`;
      errorFactors[group] = DEFAULT_ERROR_FACTOR;
      return group;
    }),
  );
  const groups = Object.keys(errorFactors);
  return {
    errorFactors,
    next(random) {
      const multipliers = new Map(groups.map((group) => [group, Math.exp(sigma * standardNormal(random))]));
      const sampled = (transitions: readonly MarkovTransition[], chain: number) =>
        transitions.map((transition, index) => ({ ...transition, rate: transition.rate * (multipliers.get(groupsOf[chain][index]) as number) }));
      return {
        ...model,
        transitions: sampled(model.transitions, 0),
        parts: model.parts?.map((part, index) => ({ ...part, transitions: sampled(part.transitions, index + 1) })),
      };
    },
  };
}

/**
 * Failure-rate uncertainty: the rates are multiplied by lognormal factors with median 1 (the stated
 * rates are the medians), the factors independent, and each sampled model is solved exactly. A fault
 * tree: one factor per rate event for its lambdaDU, lambdaDD and lambdaS, with the event's error factor.
 * A state model: one factor per transition label (see markovSampler), error factor 3. Gives the
 * 5 / 50 / 95 % values of the demand measure and the probability of meeting the target. Seeded: the
 * same seed gives the same result.
 */
export async function rateUncertainty(model: ModelFile, options: UncertaintyOptions): Promise<UncertaintyResult> {
  const samples = options.samples ?? 500;
  const seed = options.seed ?? 1;
  if (!Number.isInteger(samples) || samples < 10 || samples > 100_000) throw new RangeError(`samples must be a whole number from 10 to 100000 (got ${samples})`);
  const random = createRandomStream(seed);
  const sampler = model.kind === 'markov' ? markovSampler(model) : faultTreeSampler(model);
  const values = new Float64Array(samples);
  let met = 0;
  for (let sample = 0; sample < samples; sample++) {
    const value = evaluateMeasure(sampler.next(random), options.signal);
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
    errorFactors: sampler.errorFactors,
    values,
  };
}
