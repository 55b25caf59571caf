import { applyTest } from './compile-chain.js';
import { throwIfAborted } from '../common/abort.js';
import type { ChainSolution, ChainSolveContext } from './chain-solution.js';
import { expm } from './dense-exponential.js';
import { PERIODIC_TOLERANCE } from './solve-chain-uniformization.js';

/** Largest Krylov subspace (Arnoldi vectors) per step; a smaller chain uses its own size. */
export const KRYLOV_DIMENSION = 30;
/**
 * The a posteriori L1 error estimates of all steps of a chain add up to at most this: each step is
 * accepted while its estimate stays below this share of the mission per hour it covers.
 */
export const KRYLOV_TOLERANCE = 1e-13;
/** A step's time unit is the grid step divided by 2^r, r at most this (then the chain is refused). */
const FINEST_LEVEL = 30;

/**
 * The Arnoldi basis of one step: x(tau) = beta V_(m+1) exp(tau H~) e_1 (rows 0..m), from which PFD, the
 * failure flow and their integrals since the step start are read without forming x.
 */
interface KrylovBasis {
  /** Vectors of length n + 2 (probabilities, then the two running integrals). */
  readonly vectors: readonly Float64Array[];
  /** Basis vectors kept for the approximation: m + 1, or k after a breakdown at dimension k. */
  readonly used: number;
  /** Size of the augmented Hessenberg matrix H~ (m + 2, or k after a breakdown). */
  readonly size: number;
  readonly hessenberg: Float64Array;
  readonly beta: number;
  /** d . v_j and f . v_j (down indicator, failure-flow rates), and the integral components of each v_j. */
  readonly downOf: Float64Array;
  readonly flowOf: Float64Array;
  /** L1 norms of v_(m+1) and A v_(m+1) for the error estimate; 0 after a breakdown (exact subspace). */
  readonly nextNorm: number;
  readonly nextImageNorm: number;
}

/** The workspace of the Arnoldi process, allocated once per chain. */
interface Workspace {
  readonly n: number;
  readonly dimension: number;
  readonly vectors: readonly Float64Array[];
  readonly downOf: Float64Array;
  readonly flowOf: Float64Array;
  readonly hessenberg: Float64Array;
  /** ||Q||_1 = 2 max exit rate, the scale of the rounding of a step. */
  readonly generatorNorm: number;
  /**
   * c in the integral rows c d^T and c f^T: integrals grow with time, and unscaled they would dominate the
   * small exponential, whose rounding (relative to its largest entries) would then land on the
   * probabilities; c = max(||Q||_1, 1 / mission) keeps both on one scale.
   */
  readonly integralScale: number;
  products: number;
  /** Floating-point operations outside the sparse products (Gram-Schmidt, small exponentials, marching). */
  flops: number;
}

/**
 * Multi-phase transient solution by Krylov exponential-times-vector steps on the sparse generator (Y. Saad,
 * "Analysis of some Krylov subspace approximations to the matrix exponential operator", SIAM J. Numer.
 * Anal. 29(1), 1992; R. B. Sidje, "Expokit", ACM Trans. Math. Software 24(1), 1998, the corrected
 * m + 1 scheme and its error estimate). The column vector [p; integral of PFD; integral of w] evolves by
 * the augmented matrix A = [[Q^T, 0], [c d^T, 0], [c f^T, 0]] (c a scale, see integralScale), so each
 * step also yields the exact integrals.
 * A step builds one Arnoldi basis (m sparse products) and then marches along the grid with the small
 * matrix exp(u H~) (u the grid step or a power-of-two fraction of it), accepting each point while the
 * a posteriori L1 error estimate stays within KRYLOV_TOLERANCE times the share of the mission covered:
 * stiff phases cost steps where the solution changes, not where the fastest rate would force products, as
 * uniformization's Lambda t does. Probabilities are cut to [0, 1] (which only lowers the error, the
 * exact values lying there).
 *
 * Stated error bound of the PFD integral: each step's estimate e (L1, of the whole augmented vector) adds
 * e / c for the integral it carries and e times the rest of the mission for the distribution it hands on
 * (stochastic propagators and test moves do not enlarge L1 distances). The estimate is the leading term of
 * Saad's error expansion (Sidje's p1/p2 rule), an estimate and not a proven bound; rounding is not in it.
 * Periodic phases are repeated as in solve-chain-uniformization.ts, with the same drift term.
 */
export function solveChainKrylov(context: ChainSolveContext): ChainSolution {
  const { chain, schedule, chainIndex, keepStates, signal } = context;
  const missionHours = schedule.segments[schedule.segments.length - 1].end;
  const n = chain.size;
  const workspace = createWorkspace(chain, missionHours);
  const toleranceRate = KRYLOV_TOLERANCE / missionHours;

  const pfd = new Float64Array(schedule.pointCount);
  const frequency = new Float64Array(schedule.pointCount);
  const states = keepStates ? chain.stateIds.map(() => new Float64Array(schedule.pointCount)) : undefined;
  const distribution = Float64Array.from(chain.initial);
  let pfdIntegral = 0;
  let frequencyIntegral = 0;
  let errorBound = 0;
  let estimateSum = 0;
  let drift = 0;
  let steps = 0;
  let repeatedSegments = 0;
  let finestLevel = 0;
  let point = 0;
  let record: { length: number; steps: number; tolerance: number; start: Float64Array; end: Float64Array; firstPoint: number; pfdIntegral: number; frequencyIntegral: number; errorBound: number } | undefined;
  const write = (at: number, vector: Float64Array) => {
    let down = 0;
    let flow = 0;
    for (let state = 0; state < n; state += 1) {
      down += vector[state] * chain.down[state];
      flow += vector[state] * chain.downFlowRate[state];
    }
    pfd[at] = down;
    frequency[at] = flow;
    if (states) for (let state = 0; state < n; state += 1) states[state][at] = vector[state];
  };

  schedule.segments.forEach((segment, segmentIndex) => {
    throwIfAborted(signal);
    for (const test of schedule.testsAtStart[chainIndex][segmentIndex]) applyTest(test, distribution);
    const length = segment.end - segment.start;
    if (record && record.steps === segment.steps && Math.abs(record.length - length) <= 1e-12 * length) {
      const distance = l1Distance(distribution, record.start);
      if (distance <= record.tolerance) {
        drift += distance;
        const span = segment.steps + 1;
        pfd.copyWithin(point, record.firstPoint, record.firstPoint + span);
        frequency.copyWithin(point, record.firstPoint, record.firstPoint + span);
        if (states) for (const series of states) series.copyWithin(point, record.firstPoint, record.firstPoint + span);
        pfdIntegral += record.pfdIntegral;
        frequencyIntegral += record.frequencyIntegral;
        errorBound += record.errorBound + drift * length;
        distribution.set(record.end);
        point += span;
        repeatedSegments += 1;
        context.progress((segmentIndex + 1) / schedule.segments.length);
        return;
      }
    }
    const start = Float64Array.from(distribution);
    const before = [pfdIntegral, frequencyIntegral, errorBound];
    const firstPoint = point;
    write(point, distribution);
    const gridStep = length / segment.steps;
    const fine = 2 ** FINEST_LEVEL;
    const end = segment.steps * fine;
    /** Position within the segment in units of gridStep / 2^FINEST_LEVEL. */
    let position = 0;
    let level = 0;
    let segmentRounding = 0;
    while (position < end) {
      throwIfAborted(signal);
      level = Math.max(0, level - 1);
      while (position % (fine / 2 ** level) !== 0) level += 1;
      let unit = fine / 2 ** level;
      let step = krylovStep(workspace, distribution, chain, gridStep / 2 ** level, Math.round((end - position) / unit), toleranceRate);
      steps += 1;
      while (step.accepted === 0) {
        level += 1;
        if (level > FINEST_LEVEL) {
          throw new RangeError(`the Krylov method cannot reach the accuracy asked for on this chain (a step below ${(gridStep / fine).toExponential(1)} h)`);
        }
        unit = fine / 2 ** level;
        step = marchBasis(workspace, step.basis, gridStep / 2 ** level, Math.round((end - position) / unit), toleranceRate);
      }
      finestLevel = Math.max(finestLevel, level);
      const { basis, points } = step;
      points.forEach((y, index) => {
        const at = position + (index + 1) * unit;
        if (at % fine !== 0 || at >= end) return;
        const gridPoint = firstPoint + at / fine;
        const [down, flow] = readOutputs(basis, y);
        pfd[gridPoint] = clampProbability(down);
        frequency[gridPoint] = Math.max(0, flow);
        if (states) {
          const x = combine(basis, y, n);
          for (let state = 0; state < n; state += 1) states[state][gridPoint] = clampProbability(x[state]);
        }
      });
      const x = combine(basis, points[points.length - 1], n + 2);
      for (let state = 0; state < n; state += 1) distribution[state] = clampProbability(x[state]);
      pfdIntegral += Math.max(0, x[n] / workspace.integralScale);
      frequencyIntegral += Math.max(0, x[n + 1] / workspace.integralScale);
      position += step.accepted * unit;
      const remaining = Math.max(0, missionHours - (segment.start + (position / fine) * gridStep));
      estimateSum += step.estimate;
      // The step's estimate and its rounding, carried through the rest of the mission.
      const rounding = stepRounding(basis.used, step.accepted * (gridStep / 2 ** level), workspace.generatorNorm);
      segmentRounding += rounding;
      errorBound += (step.estimate + rounding) * (1 / workspace.integralScale + remaining);
    }
    write(firstPoint + segment.steps, distribution);
    point = firstPoint + segment.steps + 1;
    record = {
      length,
      steps: segment.steps,
      // Two computed phase starts differ by the rounding of both phases.
      tolerance: Math.max(PERIODIC_TOLERANCE, 2 * segmentRounding),
      start,
      end: Float64Array.from(distribution),
      firstPoint,
      pfdIntegral: pfdIntegral - before[0],
      frequencyIntegral: frequencyIntegral - before[1],
      errorBound: errorBound - before[2],
    };
    errorBound += drift * length;
    context.progress((segmentIndex + 1) / schedule.segments.length);
  });

  return {
    pfd,
    frequency,
    pfdIntegral,
    frequencyIntegral,
    states,
    integralErrorBound: errorBound,
    algorithm:
      `Krylov steps on the sparse generator (Arnoldi dimension up to ${workspace.dimension}, ${steps} steps, ${workspace.products} sparse products, ` +
      `smallest step the grid step / 2^${finestLevel}, ${repeatedSegments} of ${schedule.segments.length} segments repeated the previous phase in the periodic regime; ` +
      `a posteriori error estimates (Saad 1992, Sidje 1998) summing to ${estimateSum.toExponential(1)} in L1)`,
  };
}

/** Arnoldi dimensions (besides the largest) at which a step tries how far its basis already reaches. */
const CHECKED_DIMENSIONS = [4, 8, 12, 16, 20, 24];

function createWorkspace(chain: ChainSolveContext['chain'], missionHours: number): Workspace {
  const n = chain.size;
  const dimension = Math.min(KRYLOV_DIMENSION, n + 2);
  let largest = 0;
  for (const rate of chain.exitRate) largest = Math.max(largest, rate);
  const buffer = new Float64Array((dimension + 2) * (n + 2));
  return {
    n,
    dimension,
    vectors: Array.from({ length: dimension + 2 }, (_, index) => buffer.subarray(index * (n + 2), (index + 1) * (n + 2))),
    downOf: new Float64Array(dimension + 2),
    flowOf: new Float64Array(dimension + 2),
    hessenberg: new Float64Array((dimension + 2) * (dimension + 2)),
    generatorNorm: 2 * largest,
    integralScale: Math.max(2 * largest, 1 / missionHours),
    products: 0,
    flops: 0,
  };
}

/**
 * output = A input for the augmented matrix: the gather of p Q (column-stored generator), then d . p and
 * f . p into the two integral components.
 */
function multiplyAugmented(chain: ChainSolveContext['chain'], scale: number, input: Float64Array, output: Float64Array): void {
  const { inStart, inSource, inRate, exitRate, down, downFlowRate } = chain;
  const n = chain.size;
  let slot = 0;
  let downSum = 0;
  let flowSum = 0;
  for (let target = 0; target < n; target += 1) {
    const value = input[target];
    let sum = -exitRate[target] * value;
    const stop = inStart[target + 1];
    for (; slot < stop; slot += 1) sum += input[inSource[slot]] * inRate[slot];
    output[target] = sum;
    downSum += value * down[target];
    flowSum += value * downFlowRate[target];
  }
  output[n] = scale * downSum;
  output[n + 1] = scale * flowSum;
}

/** What one step reached: its basis, the accepted units and each accepted small vector y_k. */
interface StepResult {
  readonly basis: KrylovBasis;
  readonly accepted: number;
  readonly points: readonly Float64Array[];
  readonly estimate: number;
}

/**
 * One Krylov step from `distribution`: the Arnoldi process with modified Gram-Schmidt from [p; 0; 0]
 * (Saad 1992, Algorithm 1), tried at the dimensions of CHECKED_DIMENSIONS (an early basis that already
 * reaches the rest of the segment within the tolerance ends the process, so smooth phases use few
 * products), marching in units of `unitHours` up to `limit` units.
 */
function krylovStep(workspace: Workspace, distribution: Float64Array, chain: ChainSolveContext['chain'], unitHours: number, limit: number, toleranceRate: number): StepResult {
  const { n, dimension, vectors, downOf, flowOf } = workspace;
  const width = n + 2;
  const size = dimension + 2;
  const hessenberg = workspace.hessenberg.fill(0);
  let squares = 0;
  for (let state = 0; state < n; state += 1) squares += distribution[state] ** 2;
  const beta = Math.sqrt(squares);
  const first = vectors[0];
  for (let state = 0; state < n; state += 1) first[state] = distribution[state] / beta;
  first[n] = 0;
  first[n + 1] = 0;
  let imageReady = false;
  let best: StepResult | undefined;
  for (let j = 0; j < dimension; j += 1) {
    const next = vectors[j + 1];
    if (!imageReady) {
      multiplyAugmented(chain, workspace.integralScale, vectors[j], next);
      workspace.products += 1;
      downOf[j] = next[n] / workspace.integralScale;
      flowOf[j] = next[n + 1] / workspace.integralScale;
    }
    imageReady = false;
    workspace.flops += (4 * (j + 1) + 5) * width;
    let imageSquares = 0;
    for (let index = 0; index < width; index += 1) imageSquares += next[index] * next[index];
    for (let i = 0; i <= j; i += 1) {
      const basisVector = vectors[i];
      let product = 0;
      for (let index = 0; index < width; index += 1) product += basisVector[index] * next[index];
      hessenberg[i * size + j] = product;
      for (let index = 0; index < width; index += 1) next[index] -= product * basisVector[index];
    }
    let norm = 0;
    for (let index = 0; index < width; index += 1) norm += next[index] * next[index];
    norm = Math.sqrt(norm);
    if (norm <= 2 ** -52 * 4 * (j + 1) * Math.sqrt(imageSquares)) {
      // Happy breakdown: what is left of A v_j after its projection is rounding, so the subspace is
      // invariant and exp(tau H) exact in it. (A small residual alone is not one: rates of 1e-6 per hour
      // give residuals of 1e-12 and 1e-18 that still matter over a mission.)
      const basis = makeBasis(workspace, hessenberg, size, j + 1, beta, 0, 0, true);
      return marchBasis(workspace, basis, unitHours, limit, toleranceRate);
    }
    hessenberg[(j + 1) * size + j] = norm;
    const inverse = 1 / norm;
    for (let index = 0; index < width; index += 1) next[index] *= inverse;
    const reached = j + 1;
    if (reached === dimension || CHECKED_DIMENSIONS.includes(reached)) {
      // A v_(j+1) for the error estimate, which is also the next step of the process.
      const image = vectors[j + 2];
      multiplyAugmented(chain, workspace.integralScale, next, image);
      workspace.products += 1;
      downOf[j + 1] = image[n] / workspace.integralScale;
      flowOf[j + 1] = image[n + 1] / workspace.integralScale;
      imageReady = true;
      let nextNorm = 0;
      let imageNorm = 0;
      for (let index = 0; index < width; index += 1) {
        nextNorm += Math.abs(next[index]);
        imageNorm += Math.abs(image[index]);
      }
      const basis = makeBasis(workspace, hessenberg, size, reached, beta, nextNorm, imageNorm, false);
      best = marchBasis(workspace, basis, unitHours, limit, toleranceRate);
      // Half the rest of the segment is taken as it is: another small step is cheaper than a basis that
      // grows on (Gram-Schmidt costs grow with its square).
      if (2 * best.accepted >= limit) return best;
    }
  }
  return best!;
}

/** The corrected scheme's (k + 2)-square H~ from the first k Arnoldi columns: H~[k+1][k] = 1. */
function makeBasis(workspace: Workspace, hessenberg: Float64Array, stride: number, k: number, beta: number, nextNorm: number, nextImageNorm: number, exact: boolean): KrylovBasis {
  const size = exact ? k : k + 2;
  const compact = new Float64Array(size * size);
  const rows = exact ? k : k + 1;
  for (let row = 0; row < rows; row += 1) {
    for (let column = 0; column < Math.min(k, size); column += 1) compact[row * size + column] = hessenberg[row * stride + column];
  }
  if (!exact) compact[(k + 1) * size + k] = 1;
  return {
    vectors: workspace.vectors,
    used: exact ? k : k + 1,
    size,
    hessenberg: compact,
    beta,
    downOf: workspace.downOf,
    flowOf: workspace.flowOf,
    nextNorm,
    nextImageNorm,
  };
}

/**
 * Marches y_k = exp(k u H~) e_1 for k = 1, 2, ... up to `limit` units while the error estimate at k u
 * stays within toleranceRate k u, keeping each accepted y_k.
 */
function marchBasis(workspace: Workspace, basis: KrylovBasis, unitHours: number, limit: number, toleranceRate: number): StepResult {
  const size = basis.size;
  // Pade-13 with its squarings: about twenty products of size^3 multiply-adds.
  workspace.flops += 40 * size ** 3;
  const scaled = new Float64Array(size * size);
  for (let index = 0; index < scaled.length; index += 1) scaled[index] = basis.hessenberg[index] * unitHours;
  const propagator = expm(scaled, size);
  let y = new Float64Array(size);
  y[0] = 1;
  const points: Float64Array[] = [];
  let estimate = 0;
  for (let count = 1; count <= limit; count += 1) {
    const next = new Float64Array(size);
    for (let row = 0; row < size; row += 1) {
      let sum = 0;
      const offset = row * size;
      for (let column = 0; column < size; column += 1) sum += propagator[offset + column] * y[column];
      next[row] = sum;
    }
    workspace.flops += 2 * size * size;
    const error = errorEstimate(basis, next);
    if (!(error <= toleranceRate * count * unitHours)) break;
    y = next;
    estimate = error;
    points.push(next);
  }
  return { basis, accepted: points.length, points, estimate };
}

/**
 * Sidje's rule (Expokit): p1 = beta |y_m| ||v_(m+1)||, p2 = beta |y_(m+1)| ||A v_(m+1)|| (here in L1); the
 * error of the corrected scheme is p2 when the series clearly converges, p1 p2 / (p1 - p2) when it
 * converges slowly, and p1 otherwise. 0 after a breakdown.
 */
function errorEstimate(basis: KrylovBasis, y: Float64Array): number {
  if (basis.nextNorm === 0 && basis.nextImageNorm === 0) return 0;
  const m = basis.size - 2;
  const p1 = basis.beta * Math.abs(y[m]) * basis.nextNorm;
  const p2 = basis.beta * Math.abs(y[m + 1]) * basis.nextImageNorm;
  if (p1 > 10 * p2) return p2;
  if (p1 > p2) return (p1 * p2) / (p1 - p2);
  return p1;
}

/**
 * Rounding of one step (L1): the computed Arnoldi relation holds for A + E with ||E|| about 2^-52 ||A||
 * (backward stability of the process, as for Lanczos: A. Druskin, A. Greenbaum, L. Knizhnerman, SIAM J.
 * Sci. Comput. 19(1), 1998), which moves exp(tau A) p by about tau ||E||; plus the m-term combination.
 * An estimate: it matches the phase-to-phase scatter measured on periodic chains within a factor of 2.
 */
function stepRounding(used: number, hours: number, generatorNorm: number): number {
  return 2 ** -52 * (used + hours * generatorNorm);
}

/** PFD and failure flow at beta V y without forming the vector. */
function readOutputs(basis: KrylovBasis, y: Float64Array): [number, number] {
  let down = 0;
  let flow = 0;
  for (let j = 0; j < basis.used; j += 1) {
    down += y[j] * basis.downOf[j];
    flow += y[j] * basis.flowOf[j];
  }
  return [basis.beta * down, basis.beta * flow];
}

/** The first `length` components of beta V y. */
function combine(basis: KrylovBasis, y: Float64Array, length: number): Float64Array {
  const out = new Float64Array(length);
  for (let j = 0; j < basis.used; j += 1) {
    const weight = basis.beta * y[j];
    if (weight === 0) continue;
    const vector = basis.vectors[j];
    for (let index = 0; index < length; index += 1) out[index] += weight * vector[index];
  }
  return out;
}

function clampProbability(value: number): number {
  return value > 0 ? (value < 1 ? value : 1) : 0;
}

function l1Distance(a: Float64Array, b: Float64Array): number {
  let sum = 0;
  for (let index = 0; index < a.length; index += 1) sum += Math.abs(a[index] - b[index]);
  return sum;
}

/** Krylov steps the cost estimate takes on the first segment before it extrapolates. */
const PROBE_STEPS = 3;

/**
 * Estimated run time (ns) of the Krylov method, from a trial: the first segment is stepped from the
 * initial distribution (at most PROBE_STEPS steps), its sparse products priced at 3 ns per stored entry
 * (the figure) and its other arithmetic at 0.7 ns per operation (the dense method's figure), and
 * that cost per hour is taken for the whole mission (no periodic regime assumed, which only lowers the
 * cost), plus the outputs at the grid points.
 */
export function krylovCostEstimate(context: Pick<ChainSolveContext, 'chain' | 'schedule' | 'keepStates'>): number {
  const { chain, schedule, keepStates } = context;
  const missionHours = schedule.segments[schedule.segments.length - 1].end;
  const workspace = createWorkspace(chain, missionHours);
  const distribution = Float64Array.from(chain.initial);
  const segment = schedule.segments[0];
  const gridStep = (segment.end - segment.start) / segment.steps;
  const toleranceRate = KRYLOV_TOLERANCE / missionHours;
  let covered = 0;
  let level = 0;
  for (let step = 0; step < PROBE_STEPS && covered < segment.steps - 1e-9; step += 1) {
    const limit = Math.round((segment.steps - covered) * 2 ** level);
    let result = krylovStep(workspace, distribution, chain, gridStep / 2 ** level, limit, toleranceRate);
    while (result.accepted === 0 && level < FINEST_LEVEL) {
      level += 1;
      result = marchBasis(workspace, result.basis, gridStep / 2 ** level, Math.round((segment.steps - covered) * 2 ** level), toleranceRate);
    }
    if (result.accepted === 0) return Infinity;
    const x = combine(result.basis, result.points[result.points.length - 1], chain.size);
    for (let state = 0; state < chain.size; state += 1) distribution[state] = clampProbability(x[state]);
    covered += result.accepted / 2 ** level;
  }
  const nanoseconds = workspace.products * (chain.nonzeros + 2 * chain.size) * 3 + workspace.flops * 0.7;
  const perHour = nanoseconds / (covered * gridStep);
  const outputs = schedule.pointCount * (2 * KRYLOV_DIMENSION + (keepStates ? 2 * KRYLOV_DIMENSION * chain.size : 0)) * 0.7;
  return perHour * missionHours + outputs;
}

/** The most a cost estimate's trial can cost (ns): one step of the largest dimension. */
export function krylovProbeCost(chain: ChainSolveContext['chain']): number {
  const dimension = Math.min(KRYLOV_DIMENSION, chain.size + 1);
  return PROBE_STEPS * (dimension * (chain.nonzeros + 2 * chain.size) * 3 + 2 * dimension ** 2 * (chain.size + 2) * 0.7);
}
