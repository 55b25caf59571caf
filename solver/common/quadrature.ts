import { throwIfAborted } from './abort.js';

/**
 * Globally adaptive Gauss-Kronrod quadrature (7-point Gauss embedded in the 15-point Kronrod rule), the
 * scheme of QUADPACK's QAG (Piessens et al., QUADPACK, Springer 1983, routine QK15; the nodes and
 * weights below are that routine's). The integrand is evaluated in batches of times, so that a costly
 * vector integrand (a BDD pass over many time points) runs once per refinement round.
 */
const KRONROD_NODES = [
  0.991455371120812639206854697526329, 0.949107912342758524526189684047851, 0.864864423359769072789712788640926,
  0.741531185599394439863864773280788, 0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
  0.207784955007898467600689403773245, 0,
];
const KRONROD_WEIGHTS = [
  0.02293532201052922496373200805897, 0.063092092629978553290700663189204, 0.104790010322250183839876322541518,
  0.140653259715525918745189590510238, 0.16900472663926790282658342659855, 0.190350578064785409913256402421014,
  0.204432940075298892414161999234649, 0.209482141084727828012999174891714,
];
/** Weights of the 7-point Gauss rule, whose nodes are the Kronrod nodes with odd index. */
const GAUSS_WEIGHTS = [0.129484966168869693270611432679082, 0.27970539148927666790146777142378, 0.381830050505118944950369775488975, 0.417959183673469387755102040816327];

export const POINTS_PER_INTERVAL = 15;

/** The 15 Kronrod abscissae on [a, b], increasing. */
export function kronrodTimes(a: number, b: number, out: Float64Array, offset: number): void {
  const center = (a + b) / 2;
  const half = (b - a) / 2;
  for (let i = 0; i < 7; i++) {
    out[offset + i] = center - half * KRONROD_NODES[i];
    out[offset + 14 - i] = center + half * KRONROD_NODES[i];
  }
  out[offset + 7] = center;
}

/** Kronrod and Gauss estimates of the integral over [a, b] from the 15 values at kronrodTimes. */
export function kronrodRule(a: number, b: number, values: Float64Array, offset: number): { kronrod: number; gauss: number } {
  const half = (b - a) / 2;
  let kronrod = KRONROD_WEIGHTS[7] * values[offset + 7];
  let gauss = GAUSS_WEIGHTS[3] * values[offset + 7];
  for (let i = 0; i < 7; i++) {
    const pair = values[offset + i] + values[offset + 14 - i];
    kronrod += KRONROD_WEIGHTS[i] * pair;
    if (i % 2 === 1) gauss += GAUSS_WEIGHTS[(i - 1) / 2] * pair;
  }
  return { kronrod: kronrod * half, gauss: gauss * half };
}

export interface AdaptiveIntegralOptions {
  /** Target of the summed error estimate relative to |integral|. Default 1e-8. */
  readonly relativeTolerance?: number;
  /** Most subintervals before giving up refining (the achieved bound is then reported). Default 200,000. */
  readonly maxIntervals?: number;
  readonly signal?: AbortSignal;
  /** Called after each refinement round with the number of intervals. */
  readonly onRound?: (intervals: number) => void;
}

export interface AdaptiveIntegral {
  readonly integral: number;
  /** Sum over subintervals of |Kronrod - Gauss|, a conservative estimate of the absolute error. */
  readonly errorEstimate: number;
  /** Final partition: subinterval ends, increasing (length = intervals + 1). */
  readonly partition: Float64Array;
}

/**
 * Integrates a piecewise smooth function over [edges[0], edges[last]], never across an edge (the
 * integrand may jump there). Every round bisects all subintervals whose error exceeds their fair share of
 * the tolerance, so one batch evaluation serves the whole round.
 * @param evaluate writes f(times[j]) into the returned array, same length as times.
 */
export function integrateAdaptive(
  edges: Float64Array,
  evaluate: (times: Float64Array) => Float64Array,
  options: AdaptiveIntegralOptions = {},
): AdaptiveIntegral {
  const relativeTolerance = options.relativeTolerance ?? 1e-8;
  const maxIntervals = options.maxIntervals ?? 200_000;
  const total = edges[edges.length - 1] - edges[0];
  let pendingLefts: number[] = [];
  let pendingRights: number[] = [];
  for (let i = 0; i + 1 < edges.length; i++) {
    if (edges[i + 1] > edges[i]) {
      pendingLefts.push(edges[i]);
      pendingRights.push(edges[i + 1]);
    }
  }
  const settledLefts: number[] = [];
  const settledRights: number[] = [];
  let settledIntegral = 0;
  let settledError = 0;
  for (;;) {
    throwIfAborted(options.signal);
    const count = pendingLefts.length;
    const times = new Float64Array(count * POINTS_PER_INTERVAL);
    for (let i = 0; i < count; i++) kronrodTimes(pendingLefts[i], pendingRights[i], times, i * POINTS_PER_INTERVAL);
    const values = evaluate(times);
    const results: number[] = [];
    const errors: number[] = [];
    let integral = settledIntegral;
    let error = settledError;
    for (let i = 0; i < count; i++) {
      const rule = kronrodRule(pendingLefts[i], pendingRights[i], values, i * POINTS_PER_INTERVAL);
      results.push(rule.kronrod);
      errors.push(Math.abs(rule.kronrod - rule.gauss));
      integral += rule.kronrod;
      error += errors[i];
    }
    options.onRound?.(settledLefts.length + count);
    const budget = relativeTolerance * Math.abs(integral);
    const done = error <= budget || settledLefts.length + 2 * count > maxIntervals;
    const nextLefts: number[] = [];
    const nextRights: number[] = [];
    for (let i = 0; i < count; i++) {
      const share = (budget * (pendingRights[i] - pendingLefts[i])) / total;
      const width = pendingRights[i] - pendingLefts[i];
      const splittable = width > 1e-9 * total;
      if (!done && errors[i] > share && splittable) {
        const middle = (pendingLefts[i] + pendingRights[i]) / 2;
        nextLefts.push(pendingLefts[i], middle);
        nextRights.push(middle, pendingRights[i]);
      } else {
        settledLefts.push(pendingLefts[i]);
        settledRights.push(pendingRights[i]);
        settledIntegral += results[i];
        settledError += errors[i];
      }
    }
    if (nextLefts.length === 0) {
      const order = settledLefts.map((_, index) => index).sort((a, b) => settledLefts[a] - settledLefts[b]);
      const partition = new Float64Array(order.length + 1);
      order.forEach((index, position) => {
        partition[position] = settledLefts[index];
      });
      partition[order.length] = edges[edges.length - 1];
      return { integral: settledIntegral, errorEstimate: settledError, partition };
    }
    pendingLefts = nextLefts;
    pendingRights = nextRights;
  }
}

export interface PartitionRule {
  /** The 15 Kronrod abscissae of every subinterval, increasing. */
  readonly times: Float64Array;
  /** Kronrod weight of each time (already scaled to its subinterval). */
  readonly weights: Float64Array;
  /** Kronrod integral and the summed |Kronrod - Gauss| error estimate of values given at times. */
  readonly integrate: (values: Float64Array) => { integral: number; errorEstimate: number };
}

/** The Kronrod rule over a fixed partition, for integrands evaluated together at the same times. */
export function kronrodOnPartition(partition: Float64Array): PartitionRule {
  const intervals = partition.length - 1;
  const times = new Float64Array(intervals * POINTS_PER_INTERVAL);
  const weights = new Float64Array(intervals * POINTS_PER_INTERVAL);
  for (let i = 0; i < intervals; i++) {
    const offset = i * POINTS_PER_INTERVAL;
    kronrodTimes(partition[i], partition[i + 1], times, offset);
    const half = (partition[i + 1] - partition[i]) / 2;
    for (let k = 0; k < 7; k++) {
      weights[offset + k] = KRONROD_WEIGHTS[k] * half;
      weights[offset + 14 - k] = KRONROD_WEIGHTS[k] * half;
    }
    weights[offset + 7] = KRONROD_WEIGHTS[7] * half;
  }
  return {
    times,
    weights,
    integrate(values: Float64Array) {
      let integral = 0;
      let errorEstimate = 0;
      for (let i = 0; i < intervals; i++) {
        const rule = kronrodRule(partition[i], partition[i + 1], values, i * POINTS_PER_INTERVAL);
        integral += rule.kronrod;
        errorEstimate += Math.abs(rule.kronrod - rule.gauss);
      }
      return { integral, errorEstimate };
    },
  };
}
