import { applyTest } from './compile-chain.js';
import { throwIfAborted } from '../common/abort.js';
import { dot, type ChainSolution, type ChainSolveContext } from './chain-solution.js';
import { PERIODIC_TOLERANCE } from './solve-chain-uniformization.js';
import { multiply, propagatorWithIntegral, squaringsFor } from './dense-exponential.js';

/** Everything a segment of a given step length and step count needs, computed once per distinct shape. */
interface SegmentShape {
  readonly steps: number;
  /** Squarings of the Pade exponential: each can double the rounding error carried so far. */
  readonly squarings: number;
  /** exp(Q h) for one step. */
  readonly propagator: Float64Array;
  /** Integral over one step of exp(Q s) d ds (d the down indicator) and of the failure flow likewise. */
  readonly downStep: Float64Array;
  readonly flowStep: Float64Array;
  /** Segments of this shape propagated step by step so far (decides when the whole-segment form pays). */
  stepped: number;
  /** Built once stepping has cost more than it would have: exp(Q L) and exp(Q j h) d per point. */
  whole?: WholeSegment;
}

interface WholeSegment {
  readonly segmentPropagator: Float64Array;
  /** downAt[j] = exp(Q j h) d, so PFD(jh) = p0 . downAt[j]; likewise flowAt for the failure flow. */
  readonly downAt: Float64Array[];
  readonly flowAt: Float64Array[];
  /** Integral over the segment of exp(Q s) d ds (and of the failure flow). */
  readonly downIntegral: Float64Array;
  readonly flowIntegral: Float64Array;
}

/** What a propagated segment gave, kept so that the next segment of the same shape can repeat it. */
interface SegmentRecord {
  readonly shape: SegmentShape;
  readonly start: Float64Array;
  readonly end: Float64Array;
  readonly firstPoint: number;
  readonly pfdIntegral: number;
  readonly frequencyIntegral: number;
}

/**
 * Multi-phase transient solution with dense propagators computed once per distinct segment shape: exp(Q h)
 * and the integrals of the down and failure-flow indicators over a step from one Pade-13 exponential of
 * the augmented (Van Loan) matrix. A segment is then propagated step by step, one vector-matrix product
 * per output point; a shape whose segments keep being propagated (no periodic regime) switches to the
 * whole-segment form once that is cheaper: exp(Q L) by binary powering and exp(Q j h) d per point, so a
 * segment costs one vector-matrix product plus two dot products per point.
 *
 * Periodic regime: a segment of the same shape whose start, after its tests, lies within PERIODIC_TOLERANCE
 * (L1) of the previous segment's start, or within the rounding of its own products (n-term sums at each
 * step, steps n 2^-53) if that is larger, repeats that segment's curve, integrals and end distribution (the
 * argument of solve-chain-uniformization.ts: a stochastic propagator does not enlarge L1 distances, so the
 * drift times the segment length enters the bound). Exact up to rounding otherwise: about 1e-15 relative
 * per exponential and squaring (Higham 2005) and per accumulated step, the stated bound.
 */
export function solveChainDense(context: ChainSolveContext): ChainSolution {
  const { chain, schedule, chainIndex, keepStates, signal } = context;
  const n = chain.size;
  const generator = denseGenerator(chain);
  const shapes = new Map<string, SegmentShape>();
  const shapeFor = (hours: number, steps: number): SegmentShape => {
    const key = shapeKey(hours, steps);
    let shape = shapes.get(key);
    if (!shape) {
      throwIfAborted(signal);
      shape = segmentShape(generator, chain, hours, steps);
      shapes.set(key, shape);
    }
    return shape;
  };

  const pfd = new Float64Array(schedule.pointCount);
  const frequency = new Float64Array(schedule.pointCount);
  const states = keepStates ? chain.stateIds.map(() => new Float64Array(schedule.pointCount)) : undefined;
  let distribution: Float64Array = Float64Array.from(chain.initial);
  let next: Float64Array = new Float64Array(n);
  let pfdIntegral = 0;
  let frequencyIntegral = 0;
  let drift = 0;
  let driftBound = 0;
  let repeatedSegments = 0;
  let wholeSegments = 0;
  let record: SegmentRecord | undefined;
  let point = 0;

  schedule.segments.forEach((segment, segmentIndex) => {
    throwIfAborted(signal);
    for (const test of schedule.testsAtStart[chainIndex][segmentIndex]) applyTest(test, distribution);
    const length = segment.end - segment.start;
    const shape = shapeFor(length / segment.steps, segment.steps);
    const span = segment.steps + 1;
    if (record?.shape === shape) {
      const distance = l1Distance(distribution, record.start);
      if (distance <= Math.max(PERIODIC_TOLERANCE, segment.steps * n * 2 ** -53)) {
        drift += distance;
        driftBound += drift * length;
        pfd.copyWithin(point, record.firstPoint, record.firstPoint + span);
        frequency.copyWithin(point, record.firstPoint, record.firstPoint + span);
        if (states) for (const series of states) series.copyWithin(point, record.firstPoint, record.firstPoint + span);
        pfdIntegral += record.pfdIntegral;
        frequencyIntegral += record.frequencyIntegral;
        distribution.set(record.end);
        point += span;
        repeatedSegments += 1;
        context.progress((segmentIndex + 1) / schedule.segments.length);
        return;
      }
    }
    const start = Float64Array.from(distribution);
    const before = [pfdIntegral, frequencyIntegral];
    if (!shape.whole && !states && shape.stepped * steppedCost(n, shape.steps) > wholeCost(n, shape.steps)) shape.whole = wholeSegment(shape, chain);
    if (shape.whole && !states) {
      const whole = shape.whole;
      wholeSegments += 1;
      for (let step = 0; step <= segment.steps; step += 1) {
        pfd[point + step] = dot(distribution, whole.downAt[step]);
        frequency[point + step] = dot(distribution, whole.flowAt[step]);
      }
      pfdIntegral += dot(distribution, whole.downIntegral);
      frequencyIntegral += dot(distribution, whole.flowIntegral);
      vectorTimesMatrix(distribution, whole.segmentPropagator, n, next);
      [distribution, next] = [next, distribution];
    } else {
      shape.stepped += 1;
      for (let step = 0; step <= segment.steps; step += 1) {
        pfd[point + step] = dot(distribution, chain.down);
        frequency[point + step] = dot(distribution, chain.downFlowRate);
        if (states) for (let state = 0; state < n; state += 1) states[state][point + step] = distribution[state];
        if (step === segment.steps) break;
        pfdIntegral += dot(distribution, shape.downStep);
        frequencyIntegral += dot(distribution, shape.flowStep);
        vectorTimesMatrix(distribution, shape.propagator, n, next);
        [distribution, next] = [next, distribution];
      }
    }
    record = {
      shape,
      start,
      end: Float64Array.from(distribution),
      firstPoint: point,
      pfdIntegral: pfdIntegral - before[0],
      frequencyIntegral: frequencyIntegral - before[1],
    };
    driftBound += drift * length;
    point += span;
    context.progress((segmentIndex + 1) / schedule.segments.length);
  });

  return {
    pfd,
    frequency,
    pfdIntegral,
    frequencyIntegral,
    states,
    integralErrorBound: 1e-15 * (schedule.pointCount + [...shapes.values()].reduce((sum, shape) => sum + 100 * (1 + shape.squarings), 0)) * pfdIntegral + driftBound,
    algorithm:
      `Pade-13 scaling and squaring per distinct segment (${shapes.size} distinct segment${shapes.size === 1 ? '' : 's'}), integrals from the augmented (Van Loan) matrix, ` +
      `${repeatedSegments} of ${schedule.segments.length} segments repeated the previous phase in the periodic regime, ` +
      `${wholeSegments} propagated with whole-segment propagators`,
  };
}

/** Flops of one segment propagated step by step: a vector-matrix product and four dot products per step. */
function steppedCost(n: number, steps: number): number {
  return steps * (2 * n * n + 8 * n);
}

/** Flops of building the whole-segment form: binary powering and four matrix-vector products per step. */
function wholeCost(n: number, steps: number): number {
  return 2 * Math.ceil(Math.log2(steps + 1)) * 2 * n ** 3 + steps * 8 * n * n;
}

function segmentShape(generator: Float64Array, chain: ChainSolveContext['chain'], hours: number, steps: number): SegmentShape {
  const n = chain.size;
  const { propagator, integrals } = propagatorWithIntegral(generator, n, hours, [chain.down, chain.downFlowRate]);
  // exp(Q h) of a generator is stochastic; Pade leaves row sums off by up to ~1e-13, which would make the
  // mass drift by that much per step. Scaling each row back to sum 1 changes its entries by no more than
  // the Pade error itself.
  for (let row = 0; row < n; row += 1) {
    let sum = 0;
    for (let column = 0; column < n; column += 1) sum += propagator[row * n + column];
    if (sum > 0) for (let column = 0; column < n; column += 1) propagator[row * n + column] /= sum;
  }
  const maxRate = chain.exitRate.reduce((best, rate) => Math.max(best, rate), 0);
  return { steps, squarings: squaringsFor(2 * maxRate * hours), propagator, downStep: integrals[0], flowStep: integrals[1], stepped: 0 };
}

function wholeSegment(shape: SegmentShape, chain: ChainSolveContext['chain']): WholeSegment {
  const n = chain.size;
  const { propagator, steps } = shape;
  const downAt: Float64Array[] = [Float64Array.from(chain.down)];
  const flowAt: Float64Array[] = [Float64Array.from(chain.downFlowRate)];
  const downIntegral = Float64Array.from(shape.downStep);
  const flowIntegral = Float64Array.from(shape.flowStep);
  let stepDown = shape.downStep;
  let stepFlow = shape.flowStep;
  for (let step = 1; step <= steps; step += 1) {
    downAt.push(matrixTimesVector(propagator, downAt[step - 1], n));
    flowAt.push(matrixTimesVector(propagator, flowAt[step - 1], n));
    if (step < steps) {
      stepDown = matrixTimesVector(propagator, stepDown, n);
      stepFlow = matrixTimesVector(propagator, stepFlow, n);
      for (let state = 0; state < n; state += 1) {
        downIntegral[state] += stepDown[state];
        flowIntegral[state] += stepFlow[state];
      }
    }
  }
  return { segmentPropagator: matrixPower(propagator, steps, n), downAt, flowAt, downIntegral, flowIntegral };
}

function l1Distance(a: Float64Array, b: Float64Array): number {
  let sum = 0;
  for (let index = 0; index < a.length; index += 1) sum += Math.abs(a[index] - b[index]);
  return sum;
}

/**
 * Segments whose steps agree to 12 significant digits share a shape: test times computed as first + k *
 * interval differ in their last bits, and exp(Q h) changes by far less than 1e-12 relative for such a
 * difference in h.
 */
export function shapeKey(hours: number, steps: number): string {
  return `${hours.toPrecision(12)}/${steps}`;
}

function vectorTimesMatrix(vector: Float64Array, matrix: Float64Array, n: number, out: Float64Array): void {
  out.fill(0);
  for (let i = 0; i < n; i += 1) {
    const weight = vector[i];
    if (weight === 0) continue;
    const offset = i * n;
    for (let j = 0; j < n; j += 1) out[j] += weight * matrix[offset + j];
  }
}

function matrixTimesVector(matrix: Float64Array, vector: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i += 1) {
    let sum = 0;
    const offset = i * n;
    for (let j = 0; j < n; j += 1) sum += matrix[offset + j] * vector[j];
    out[i] = sum;
  }
  return out;
}

/** M^power by binary powering (log2(power) squarings). */
function matrixPower(matrix: Float64Array, power: number, n: number): Float64Array {
  let result: Float64Array | undefined;
  let base = matrix;
  let remaining = power;
  while (remaining > 0) {
    if (remaining & 1) result = result ? multiply(result, base, n) : Float64Array.from(base);
    remaining >>= 1;
    if (remaining > 0) base = multiply(base, base, n);
  }
  return result ?? identity(n);
}

function identity(n: number): Float64Array {
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i += 1) out[i * n + i] = 1;
  return out;
}

function denseGenerator(chain: ChainSolveContext['chain']): Float64Array {
  const n = chain.size;
  const generator = new Float64Array(n * n);
  for (let target = 0; target < n; target += 1) {
    for (let slot = chain.inStart[target]; slot < chain.inStart[target + 1]; slot += 1) {
      generator[chain.inSource[slot] * n + target] += chain.inRate[slot];
    }
  }
  for (let state = 0; state < n; state += 1) generator[state * n + state] -= chain.exitRate[state];
  return generator;
}

/**
 * Estimated run time (ns) of the dense method: per distinct segment shape, Pade-13 on the augmented
 * matrix (six products, the solve and the squarings, each about 2 m^3 flops); its segments propagated
 * step by step, or in the whole-segment form once that is cheaper (assuming no periodic regime, which only
 * lowers the cost); about 0.7 ns per flop on this kind of machine (the figure: a 256-state Pade-13
 * in 0.3 s).
 */
export function denseCostEstimate(context: Pick<ChainSolveContext, 'chain' | 'schedule' | 'keepStates'>): number {
  const { chain, schedule, keepStates } = context;
  const n = chain.size;
  const size = n + 2;
  const maxRate = chain.exitRate.reduce((best, rate) => Math.max(best, rate), 0);
  const shapes = new Map<string, { hours: number; steps: number; segments: number }>();
  for (const segment of schedule.segments) {
    const hours = (segment.end - segment.start) / segment.steps;
    const key = shapeKey(hours, segment.steps);
    const shape = shapes.get(key) ?? { hours, steps: segment.steps, segments: 0 };
    shape.segments += 1;
    shapes.set(key, shape);
  }
  let flops = 0;
  for (const { hours, steps, segments } of shapes.values()) {
    flops += (9 + squaringsFor(2 * maxRate * hours)) * 2 * size ** 3;
    const stepped = segments * steppedCost(n, steps);
    flops += keepStates ? stepped : Math.min(stepped, wholeCost(n, steps) + segments * (2 * n * n + (steps + 1) * 4 * n));
  }
  return flops * 0.7;
}

/** Values the dense method holds at once: the augmented exponential's work matrices and, per shape, the per-step vectors. */
export function denseMemoryEstimate(context: Pick<ChainSolveContext, 'chain' | 'schedule'>): number {
  const { chain, schedule } = context;
  const shapes = new Map<string, number>();
  for (const segment of schedule.segments) shapes.set(shapeKey((segment.end - segment.start) / segment.steps, segment.steps), segment.steps);
  let values = 12 * (chain.size + 2) ** 2;
  for (const steps of shapes.values()) values += (2 * (steps + 1) + 4) * chain.size + 2 * chain.size ** 2;
  return values;
}
