import { applyTest } from './compile-chain.js';
import { throwIfAborted } from '../common/abort.js';
import { dot, type ChainSolution, type ChainSolveContext } from './chain-solution.js';
import { multiply, propagatorWithIntegral, squaringsFor } from './dense-exponential.js';

/** Everything a segment of a given step length and step count needs, computed once per distinct shape. */
interface SegmentShape {
  readonly propagator: Float64Array;
  /** exp(Q L) for the whole segment. */
  readonly segmentPropagator: Float64Array;
  /** downAt[j] = exp(Q j h) d, so PFD(jh) = p0 . downAt[j]; likewise flowAt for the failure flow. */
  readonly downAt: Float64Array[];
  readonly flowAt: Float64Array[];
  /** Integral over the segment of exp(Q s) d ds (and of the failure flow). */
  readonly downIntegral: Float64Array;
  readonly flowIntegral: Float64Array;
}

/**
 * Multi-phase transient solution with dense propagators computed once per distinct segment shape: exp(Q h)
 * and the integrals of the down and failure-flow indicators over a step from one Pade-13 exponential of
 * the augmented (Van Loan) matrix, then exp(Q j h) d for the output points and exp(Q L) for the whole
 * segment, so a segment costs one vector-matrix product plus a dot product per output point. The mission
 * is stepped through segment by segment with the test moves in between. Exact up to rounding: about 1e-15
 * relative per exponential (Higham 2005) and per accumulated step, the stated bound.
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
  let point = 0;

  schedule.segments.forEach((segment, segmentIndex) => {
    throwIfAborted(signal);
    for (const test of schedule.testsAtStart[chainIndex][segmentIndex]) applyTest(test, distribution);
    const shape = shapeFor((segment.end - segment.start) / segment.steps, segment.steps);
    for (let step = 0; step <= segment.steps; step += 1) {
      pfd[point + step] = dot(distribution, shape.downAt[step]);
      frequency[point + step] = dot(distribution, shape.flowAt[step]);
    }
    pfdIntegral += dot(distribution, shape.downIntegral);
    frequencyIntegral += dot(distribution, shape.flowIntegral);
    if (states) {
      next.set(distribution);
      for (let step = 0; step <= segment.steps; step += 1) {
        for (let state = 0; state < n; state += 1) states[state][point + step] = next[state];
        if (step < segment.steps) next = vectorTimesMatrix(next, shape.propagator, n);
      }
    }
    next = vectorTimesMatrix(distribution, shape.segmentPropagator, n);
    [distribution, next] = [next, distribution];
    point += segment.steps + 1;
    context.progress((segmentIndex + 1) / schedule.segments.length);
  });

  return {
    pfd,
    frequency,
    pfdIntegral,
    frequencyIntegral,
    states,
    integralErrorBound: 1e-15 * (schedule.pointCount + shapes.size * 100) * pfdIntegral,
    algorithm: `Pade-13 scaling and squaring per distinct segment (${shapes.size} distinct segment${shapes.size === 1 ? '' : 's'}), integrals from the augmented (Van Loan) matrix`,
  };
}

function segmentShape(generator: Float64Array, chain: ChainSolveContext['chain'], hours: number, steps: number): SegmentShape {
  const n = chain.size;
  const { propagator, integrals } = propagatorWithIntegral(generator, n, hours, [chain.down, chain.downFlowRate]);
  const downAt: Float64Array[] = [Float64Array.from(chain.down)];
  const flowAt: Float64Array[] = [Float64Array.from(chain.downFlowRate)];
  const downIntegral = Float64Array.from(integrals[0]);
  const flowIntegral = Float64Array.from(integrals[1]);
  let stepDown = integrals[0];
  let stepFlow = integrals[1];
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
  return { propagator, segmentPropagator: matrixPower(propagator, steps, n), downAt, flowAt, downIntegral, flowIntegral };
}

/**
 * Segments whose steps agree to 12 significant digits share a shape: test times computed as first + k *
 * interval differ in their last bits, and exp(Q h) changes by far less than 1e-12 relative for such a
 * difference in h.
 */
export function shapeKey(hours: number, steps: number): string {
  return `${hours.toPrecision(12)}/${steps}`;
}

function vectorTimesMatrix(vector: Float64Array, matrix: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i += 1) {
    const weight = vector[i];
    if (weight === 0) continue;
    const offset = i * n;
    for (let j = 0; j < n; j += 1) out[j] += weight * matrix[offset + j];
  }
  return out;
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
 * matrix (six products, the solve and the squarings, each about 2 m^3 flops), log2(steps) products for
 * exp(Q L) and 4 matrix-vector products per step; per segment one vector-matrix product and two dot
 * products per point (n^2 per point when the states are kept); about 0.7 ns per flop on this kind of
 * machine (the figure: a 256-state Pade-13 in 0.3 s).
 */
export function denseCostEstimate(context: Pick<ChainSolveContext, 'chain' | 'schedule' | 'keepStates'>): number {
  const { chain, schedule, keepStates } = context;
  const n = chain.size;
  const size = n + 2;
  const maxRate = chain.exitRate.reduce((best, rate) => Math.max(best, rate), 0);
  const shapes = new Map<string, { hours: number; steps: number }>();
  for (const segment of schedule.segments) {
    const hours = (segment.end - segment.start) / segment.steps;
    shapes.set(shapeKey(hours, segment.steps), { hours, steps: segment.steps });
  }
  let flops = 0;
  for (const { hours, steps } of shapes.values()) {
    flops += (9 + squaringsFor(2 * maxRate * hours)) * 2 * size ** 3 + 2 * Math.ceil(Math.log2(steps + 1)) * 2 * n ** 3 + steps * 8 * n ** 2;
  }
  for (const segment of schedule.segments) flops += 2 * n ** 2 + (segment.steps + 1) * 4 * n + (keepStates ? segment.steps * 2 * n ** 2 : 0);
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
