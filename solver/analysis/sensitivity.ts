import type { FaultTreeModel, MarkovModel, MarkovTest, ModelFile, RateEvent } from '../../shared/model-file.js';
import { isProbabilityEvent } from '../../shared/model-file.js';
import { throwIfAborted } from '../common/abort.js';
import { evaluateMeasure, meetsTarget, type MeasureTarget, type RepeatedSolveOptions } from './evaluate-measure.js';

/** The tests of a state model: the main chain's and each part's. */
function markovTests(model: MarkovModel): MarkovTest[] {
  return [...(model.tests ?? []), ...(model.parts ?? []).flatMap((part) => part.tests ?? [])];
}

/**
 * The longest proof test interval of the model, the reference of the sweep; undefined without tests.
 * A fault tree: of its rate events' proof tests. A state model: of its tests (main chain and parts).
 */
export function referenceInterval(model: ModelFile): number | undefined {
  const intervals =
    model.kind === 'markov'
      ? markovTests(model).map((test) => test.intervalHours)
      : model.events.flatMap((event) => (!isProbabilityEvent(event) && event.proofTest ? [event.proofTest.intervalHours] : []));
  return intervals.length > 0 ? Math.max(...intervals) : undefined;
}

/**
 * The model with every proof test interval (and first test) scaled by one factor so that the longest is
 * `hours`; intervals are capped at the mission. Returns undefined when a test would last as long as its
 * new interval. A state model's tests (partial ones too) scale the same way; their moves are unchanged.
 */
export function withProofTestInterval<M extends ModelFile>(model: M, hours: number): M | undefined {
  const reference = referenceInterval(model);
  if (reference === undefined) return model;
  const factor = hours / reference;
  const mission = model.mission.hours;
  if (model.kind === 'markov') {
    const scale = (tests: readonly MarkovTest[] | undefined) =>
      tests?.map((test) => ({
        ...test,
        intervalHours: Math.min(mission, test.intervalHours * factor),
        firstHours: test.firstHours === undefined ? undefined : Math.min(mission, test.firstHours * factor),
      }));
    const markov: MarkovModel = model;
    return { ...markov, tests: scale(markov.tests), parts: markov.parts?.map((part) => ({ ...part, tests: scale(part.tests) })) } as M;
  }
  const tree: FaultTreeModel = model as FaultTreeModel;
  let valid = true;
  const events = tree.events.map((event) => {
    if (isProbabilityEvent(event) || !event.proofTest) return event;
    const test = event.proofTest;
    const intervalHours = Math.min(mission, test.intervalHours * factor);
    const firstHours = test.firstHours === undefined ? undefined : Math.min(mission, test.firstHours * factor);
    if (test.durationHours !== undefined && test.durationHours >= intervalHours) valid = false;
    const partialTest = event.partialTest && event.partialTest.intervalHours > intervalHours ? { ...event.partialTest, intervalHours, firstHours: undefined } : event.partialTest;
    return { ...event, proofTest: { ...test, intervalHours, firstHours }, partialTest } as RateEvent;
  });
  return valid ? ({ ...tree, events } as M) : undefined;
}

export interface SweepPoint {
  readonly intervalHours: number;
  readonly value: number;
  readonly meetsTarget: boolean;
}

export interface IntervalSweep {
  /** The longest proof test interval of the model as it is (the other intervals scale with it). */
  readonly referenceHours: number;
  readonly points: readonly SweepPoint[];
  /**
   * The longest interval that still meets the target (bisection to 0.1 %), null when even the shortest
   * swept interval misses it; equal to the mission when every interval up to the mission meets it.
   */
  readonly longestMeetingHours: number | null;
}

export interface SweepOptions extends RepeatedSolveOptions {
  readonly target: MeasureTarget;
  /** Swept intervals, log-spaced from reference / 20 to the mission. Default 24. */
  readonly points?: number;
}

/**
 * PFDavg (or PFH) against the proof test interval: a log-spaced sweep plus the model's own interval,
 * and the interval that just meets the target found by bisection on log(interval) between the last
 * swept point that meets it and the first that does not (PFDavg rises with the interval for a coherent
 * fault tree, Rausand & Hoyland, System Reliability Theory 2nd ed., ch. 10, from memory; for a state
 * model whose tests bring failed states back up it rises the same way, and the bisection assumes so).
 */
export async function intervalSweep(model: ModelFile, options: SweepOptions): Promise<IntervalSweep> {
  const reference = referenceInterval(model);
  if (reference === undefined) throw new RangeError('the model has no proof tests: there is no interval to sweep');
  const mission = model.mission.hours;
  const count = Math.max(2, options.points ?? 24);
  const lowest = Math.min(reference, mission) / 20;
  const hours = new Set<number>([reference]);
  for (let index = 0; index < count; index++) hours.add(lowest * Math.pow(mission / lowest, index / (count - 1)));
  const grid = [...hours].sort((a, b) => a - b);
  const bisectionSteps = 12;
  const total = grid.length + bisectionSteps;
  let done = 0;
  const step = async (value: number) => {
    done++;
    options.onProgress?.(Math.min(1, done / total));
    await options.pause?.();
    throwIfAborted(options.signal);
    return value;
  };
  const evaluateAt = async (interval: number): Promise<number | undefined> => {
    const variant = withProofTestInterval(model, interval);
    if (!variant) return undefined;
    return step(evaluateMeasure(variant, options.signal));
  };
  const points: SweepPoint[] = [];
  for (const interval of grid) {
    const value = await evaluateAt(interval);
    if (value !== undefined) points.push({ intervalHours: interval, value, meetsTarget: meetsTarget(value, options.target) });
  }
  let longestMeetingHours: number | null = null;
  const firstMiss = points.findIndex((point) => !point.meetsTarget);
  if (firstMiss === -1) longestMeetingHours = points.length > 0 ? points[points.length - 1].intervalHours : null;
  else if (firstMiss > 0) {
    let low = Math.log(points[firstMiss - 1].intervalHours);
    let high = Math.log(points[firstMiss].intervalHours);
    for (let iteration = 0; iteration < bisectionSteps && high - low > 1e-3; iteration++) {
      const middle = (low + high) / 2;
      const value = await evaluateAt(Math.exp(middle));
      if (value !== undefined && meetsTarget(value, options.target)) low = middle;
      else high = middle;
    }
    longestMeetingHours = Math.exp(low);
  }
  options.onProgress?.(1);
  return { referenceHours: reference, points, longestMeetingHours };
}

export interface TornadoBar {
  /** What changed, e.g. "lambdaDU of PT-101A" or "proof test interval". */
  readonly parameter: string;
  /** The model item, for highlighting on the canvas; null for the interval of all tests. */
  readonly itemId: string | null;
  readonly lowValue: number;
  readonly highValue: number;
  /** What "low" and "high" mean, e.g. "/ 2" and "x 2". */
  readonly lowChange: string;
  readonly highChange: string;
}

export interface Tornado {
  readonly base: number;
  readonly factor: number;
  /** Largest swing first. */
  readonly bars: readonly TornadoBar[];
}

interface Variation {
  readonly parameter: string;
  readonly itemId: string | null;
  readonly apply: (factor: number) => ModelFile | undefined;
}

function replaceEvent(model: FaultTreeModel, id: string, change: (event: RateEvent) => RateEvent): FaultTreeModel {
  return { ...model, events: model.events.map((event) => (event.id === id && !isProbabilityEvent(event) ? change(event) : event)) };
}

function intervalVariation(model: ModelFile): Variation[] {
  const reference = referenceInterval(model);
  return reference === undefined ? [] : [{ parameter: 'proof test interval (all tests)', itemId: null, apply: (factor) => withProofTestInterval(model, reference * factor) }];
}

function faultTreeVariations(model: FaultTreeModel): Variation[] {
  const list: Variation[] = [];
  for (const event of model.events) {
    if (isProbabilityEvent(event)) continue;
    const id = event.id;
    if (event.lambdaDU > 0) {
      list.push({ parameter: `lambdaDU of ${id}`, itemId: id, apply: (factor) => replaceEvent(model, id, (item) => ({ ...item, lambdaDU: item.lambdaDU * factor })) });
    }
    if ((event.lambdaDD ?? 0) > 0 && (event.mttrHours ?? 0) > 0) {
      list.push({ parameter: `lambdaDD of ${id}`, itemId: id, apply: (factor) => replaceEvent(model, id, (item) => ({ ...item, lambdaDD: (item.lambdaDD ?? 0) * factor })) });
    }
    const coverage = event.proofTest?.coverage;
    if (coverage !== undefined && coverage < 1) {
      list.push({
        parameter: `proof test coverage of ${id} (uncovered part)`,
        itemId: id,
        apply: (factor) => {
          const changed = Math.max(0, Math.min(1, 1 - (1 - coverage) * factor));
          if (event.partialTest && event.partialTest.coverage > changed) return undefined;
          return replaceEvent(model, id, (item) => ({ ...item, proofTest: item.proofTest && { ...item.proofTest, coverage: changed } }));
        },
      });
    }
  }
  for (const group of model.ccf ?? []) {
    if (group.beta <= 0) continue;
    list.push({
      parameter: `beta of ${group.id}`,
      itemId: group.id,
      apply: (factor) => ({
        ...model,
        ccf: (model.ccf ?? []).map((item) =>
          item.id === group.id ? { ...item, beta: Math.min(1, item.beta * factor), betaD: item.betaD === undefined ? undefined : Math.min(1, item.betaD * factor) } : item,
        ),
      }),
    });
  }
  return [...list, ...intervalVariation(model)];
}

/**
 * A state model's transition rates, one parameter each (main chain first, then each part, in file
 * order): the rates are the state model's only failure and repair data. Test moves are left alone,
 * since the moves out of a state must sum to 1 and a one-sided change has no meaning.
 */
function markovVariations(model: MarkovModel): Variation[] {
  const list: Variation[] = [];
  const chains = [{ part: null as string | null, transitions: model.transitions }, ...(model.parts ?? []).map((part) => ({ part: part.id, transitions: part.transitions }))];
  for (const { part, transitions } of chains) {
    transitions.forEach((transition, index) => {
      if (transition.rate <= 0) return;
      const scaled = (factor: number) => transitions.map((item, position) => (position === index ? { ...item, rate: item.rate * factor } : item));
      list.push({
        parameter: `${part === null ? '' : `${part}: `}rate ${transition.from} -> ${transition.to}${transition.label ? ` (${transition.label})` : ''}`,
        itemId: null,
        apply: (factor) =>
          part === null
            ? { ...model, transitions: scaled(factor) }
            : { ...model, parts: model.parts?.map((item) => (item.id === part ? { ...item, transitions: scaled(factor) } : item)) },
      });
    });
  }
  return [...list, ...intervalVariation(model)];
}

/**
 * A tornado of one-at-a-time changes, the others held (common practice of one-way sensitivity), each
 * divided and multiplied by `factor`. A fault tree: each rate (lambdaDU, lambdaDD), each uncovered proof
 * test part, each beta factor and the interval of all proof tests. A state model: each transition rate
 * and the interval of all tests. A change that makes the model invalid (a coverage below the partial
 * test's, a test longer than its interval) keeps the base value for that side.
 */
export async function tornado(model: ModelFile, options: RepeatedSolveOptions & { readonly factor?: number } = {}): Promise<Tornado> {
  const factor = options.factor ?? 2;
  if (!(factor > 1)) throw new RangeError(`the tornado factor must be above 1 (got ${factor})`);
  const base = evaluateMeasure(model, options.signal);
  const list = model.kind === 'markov' ? markovVariations(model) : faultTreeVariations(model);
  const bars: TornadoBar[] = [];
  const total = list.length * 2;
  let done = 0;
  const factorText = String(Number(factor.toPrecision(3)));
  for (const item of list) {
    const values: number[] = [];
    for (const change of [1 / factor, factor]) {
      const variant = item.apply(change);
      values.push(variant ? evaluateMeasure(variant, options.signal) : base);
      done++;
      options.onProgress?.(done / total);
      await options.pause?.();
      throwIfAborted(options.signal);
    }
    bars.push({
      parameter: item.parameter,
      itemId: item.itemId,
      lowValue: values[0],
      highValue: values[1],
      lowChange: `/ ${factorText}`,
      highChange: `x ${factorText}`,
    });
  }
  bars.sort((a, b) => Math.abs(b.highValue - b.lowValue) - Math.abs(a.highValue - a.lowValue));
  return { base, factor, bars };
}
