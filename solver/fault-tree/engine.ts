import type { FaultTreeModel } from '../../shared/model-file.js';
import { throwIfAborted } from '../common/abort.js';
import { integrateAdaptive, kronrodOnPartition, type PartitionRule } from '../common/quadrature.js';
import { curveTimes } from '../common/time-grid.js';
import { buildTree, type BuiltTree } from './build.js';
import { cutSetBounds, type CutSetBoundOptions, type CutSetBounds } from './cut-set-bounds.js';
import { backwardIntegrals, backwardPass, flatten, forwardPass, variableMatrix, type FlatDiagram } from './evaluate.js';
import type { EventTimeline } from '../events/event-timeline.js';
import { compileVariables, type TreeVariables } from './variables.js';

/** Target of the summed Kronrod-Gauss error estimate, relative; the stated bound is 1e-6. */
export const QUADRATURE_TOLERANCE = 1e-8;
export const STATED_ERROR_BOUND = 1e-6;

export interface EngineOptions {
  readonly signal?: AbortSignal;
  /** The model's compiled variables, when the caller has them already. */
  readonly variables?: TreeVariables;
  /** Node budget of the decision diagram. Default 2,000,000. */
  readonly nodeLimit?: number;
  /** Doubles of scratch per batch of time points (sets the batch length). Default 2^21. */
  readonly scratchDoubles?: number;
}

export interface ItemAverages {
  /** Time integral of Birnbaum importance, per model variable. */
  readonly birnbaum: Float64Array;
  /** Time integral of q_v times Birnbaum importance, per model variable. */
  readonly qTimesBirnbaum: Float64Array;
}

/** Called per batch of a pass over quadrature times; start is the batch's first index (0 starts a pass). */
export type CutSetBatchCallback = (q: Float64Array, count: number, weights: Float64Array, start: number) => void;

/** PFH, PFDavg and the importance integrals of one pass over a partition's Kronrod times. */
export interface FrequencyAndImportance {
  readonly pfh: number;
  readonly relativeError: number;
  /** PFDavg on the same partition and its Kronrod-Gauss error estimate, relative. */
  readonly pfdAvg: number;
  readonly pfdRelativeError: number;
  readonly averages: ItemAverages;
}

/** What averages() returns: the pass's results and the partition they were integrated on. */
export interface EngineAverages extends FrequencyAndImportance {
  /** The partition the values were integrated on, and its Kronrod rule. */
  readonly partition: Float64Array;
  readonly rule: PartitionRule;
}

/**
 * Starting partition of the quadrature: after each breakpoint, a repair (rate 1/MTTR) decays as
 * e^{-s/MTTR}; splitting at 4 and 16 of the shortest and 40 of the longest MTTR lets the first round of
 * Gauss-Kronrod resolve it instead of several rounds of bisection.
 */
function splitForRepair(edges: Float64Array, rows: readonly EventTimeline[]): Float64Array {
  const mttrs = rows.filter((row) => row.mu !== Infinity && (row.modes.length > 0 || row.lambdaDD > 0)).map((row) => 1 / row.mu);
  if (mttrs.length === 0) return edges;
  const shortest = Math.min(...mttrs);
  const longest = Math.max(...mttrs);
  const offsets = [...new Set([4 * shortest, 16 * shortest, 40 * longest])].sort((a, b) => a - b);
  const points: number[] = [];
  for (let i = 0; i + 1 < edges.length; i++) {
    points.push(edges[i]);
    for (const offset of offsets) if (edges[i] + offset < edges[i + 1] - offset / 4) points.push(edges[i] + offset);
  }
  points.push(edges[edges.length - 1]);
  return Float64Array.from(points);
}

/**
 * The exact fault-tree engine of one model: the decision diagram built once, then evaluated at batches
 * of time points. Each stage is a method so that the benchmark can time it.
 */
export class FaultTreeEngine {
  readonly variables: TreeVariables;
  readonly tree: BuiltTree;
  readonly diagram: FlatDiagram;
  readonly missionHours: number;
  /** 0, every breakpoint of any event inside the mission, and the mission end. */
  readonly edges: Float64Array;
  /** The edges plus splits a few repair times after each, where a repair transient decays. */
  readonly quadratureEdges: Float64Array;
  private readonly signal: AbortSignal | undefined;
  private readonly batch: number;

  constructor(
    readonly model: FaultTreeModel,
    options: EngineOptions = {},
  ) {
    this.signal = options.signal;
    this.missionHours = model.mission.hours;
    this.variables = options.variables ?? compileVariables(model);
    throwIfAborted(this.signal);
    this.tree = buildTree(model, this.variables, options.nodeLimit ?? 2_000_000);
    this.diagram = flatten(this.tree.bdd, this.tree.root, this.tree.variableAt, this.variables.rowOf);
    this.tree.bdd.clearCaches();
    const points = new Set<number>([0, this.missionHours]);
    for (const timeline of this.variables.rows) {
      for (const time of timeline.breakpoints) if (time > 0 && time < this.missionHours) points.add(time);
    }
    this.edges = Float64Array.from([...points].sort((a, b) => a - b));
    this.quadratureEdges = splitForRepair(this.edges, this.variables.rows);
    this.batch = Math.max(8, Math.min(4096, Math.floor((options.scratchDoubles ?? 2 ** 21) / this.diagram.size)));
  }

  /**
   * Node evaluations a full solve needs, about: the curve, then the quadrature (15 times per interval,
   * a forward pass for PFDavg and a forward and a backward pass for PFH).
   */
  expectedWork(timePoints: number): number {
    return this.diagram.size * (timePoints + 2 * this.edges.length + 15 * this.quadratureEdges.length * 4);
  }

  /** P(top) at each time (the left limit where fromLeft[j] is 1), in batches. */
  topProbability(times: Float64Array, fromLeft?: Uint8Array, diagram: FlatDiagram = this.diagram): Float64Array {
    const out = new Float64Array(times.length);
    const batch = Math.max(8, Math.min(4096, Math.floor((this.batch * this.diagram.size) / diagram.size)));
    const values = new Float64Array(diagram.size * batch);
    for (let start = 0; start < times.length; start += batch) {
      throwIfAborted(this.signal);
      const slice = times.subarray(start, Math.min(times.length, start + batch));
      const { q } = variableMatrix(this.variables.rows, slice, false, fromLeft?.subarray(start, start + slice.length));
      out.set(forwardPass(diagram, q, slice.length, values), start);
    }
    return out;
  }

  /** The curve: the uniform grid and every breakpoint, each breakpoint twice (left limit, then value). */
  curve(timePoints: number): { hours: Float64Array; pfd: Float64Array } {
    const { hours, fromLeft } = curveTimes(this.missionHours, timePoints, this.edges);
    return { hours, pfd: this.topProbability(hours, fromLeft) };
  }

  /** PFDavg: (1/T) times the adaptive Gauss-Kronrod integral of PFD(t) between breakpoints. */
  pfdAverage(onRound?: (intervals: number) => void): { pfdAvg: number; relativeError: number; partition: Float64Array } {
    const result = integrateAdaptive(this.quadratureEdges, (times) => this.topProbability(times), {
      relativeTolerance: QUADRATURE_TOLERANCE,
      signal: this.signal,
      onRound,
    });
    const pfdAvg = result.integral / this.missionHours;
    return { pfdAvg, relativeError: result.integral > 0 ? result.errorEstimate / result.integral : 0, partition: result.partition };
  }

  /**
   * PFH and the time integrals of every variable's Birnbaum importance on a fixed partition: one forward
   * and one backward pass per batch. The top's failure frequency is sum_v B_v(t) w_v(t), the failure
   * frequency of a coherent structure of independent components (Rausand & Hoyland, System Reliability
   * Theory, 2nd ed., chapter on system reliability, from memory).
   * The same passes give P(top) at the partition's times, so PFDavg on this partition comes with it.
   * @param onCutSetBatch called per batch with the q matrix (one row per timeline, see rowOf), the batch
   *   length, the weights and the index of the batch's first time (0 starts a pass).
   */
  frequencyAndImportance(rule: PartitionRule, onCutSetBatch?: CutSetBatchCallback): FrequencyAndImportance {
    const { times, weights } = rule;
    const variableCount = this.variables.variables.length;
    const birnbaumIntegral = new Float64Array(variableCount);
    const qTimesBirnbaumIntegral = new Float64Array(variableCount);
    const frequency = new Float64Array(times.length);
    const top = new Float64Array(times.length);
    const size = this.diagram.size;
    const batch = Math.max(8, Math.floor(this.batch / 2));
    const values = new Float64Array(size * batch);
    const reach = new Float64Array(size * batch);
    for (let start = 0; start < times.length; start += batch) {
      throwIfAborted(this.signal);
      const count = Math.min(batch, times.length - start);
      const slice = times.subarray(start, start + count);
      const { q, w } = variableMatrix(this.variables.rows, slice, true);
      top.set(forwardPass(this.diagram, q, count, values), start);
      const batchWeights = weights.subarray(start, start + count);
      backwardIntegrals(this.diagram, q, w as Float64Array, count, values, reach, batchWeights, birnbaumIntegral, qTimesBirnbaumIntegral, frequency.subarray(start, start + count));
      onCutSetBatch?.(q, count, batchWeights, start);
    }
    const integral = rule.integrate(frequency);
    const unavailability = rule.integrate(top);
    return {
      pfh: integral.integral / this.missionHours,
      relativeError: integral.integral > 0 ? integral.errorEstimate / integral.integral : 0,
      pfdAvg: unavailability.integral / this.missionHours,
      pfdRelativeError: unavailability.integral > 0 ? unavailability.errorEstimate / unavailability.integral : 0,
      averages: { birnbaum: birnbaumIntegral, qTimesBirnbaum: qTimesBirnbaumIntegral },
    };
  }

  /**
   * PFDavg, PFH and every variable's importance integrals, sharing one evaluation where it can: the
   * starting partition's Kronrod times get one q matrix, one forward and one backward pass. When that
   * partition's Kronrod-Gauss estimate of PFDavg already meets QUADRATURE_TOLERANCE (the test with which
   * integrateAdaptive stops after its first round), the result is the one of pfdAverage() followed by
   * frequencyAndImportance() on its partition, at half the evaluations; otherwise those two run.
   * @param onCutSetBatch as for frequencyAndImportance; a batch with start 0 begins a new pass.
   */
  averages(onCutSetBatch?: CutSetBatchCallback): EngineAverages {
    const rule = kronrodOnPartition(this.quadratureEdges);
    const shared = this.frequencyAndImportance(rule, onCutSetBatch);
    if (shared.pfdRelativeError <= QUADRATURE_TOLERANCE) {
      return { ...shared, partition: this.quadratureEdges, rule };
    }
    const average = this.pfdAverage();
    const refined = kronrodOnPartition(average.partition);
    const frequency = this.frequencyAndImportance(refined, onCutSetBatch);
    return { ...frequency, pfdAvg: average.pfdAvg, pfdRelativeError: average.relativeError, partition: average.partition, rule: refined };
  }

  /** PFH by its own adaptive integral, for when the PFDavg partition does not reach the tolerance. */
  pfhAdaptive(): { pfh: number; relativeError: number } {
    const size = this.diagram.size;
    const result = integrateAdaptive(
      this.quadratureEdges,
      (times) => {
        const out = new Float64Array(times.length);
        const batch = Math.max(8, Math.floor(this.batch / 2));
        const values = new Float64Array(size * batch);
        const reach = new Float64Array(size * batch);
        for (let start = 0; start < times.length; start += batch) {
          const count = Math.min(batch, times.length - start);
          const { q, w } = variableMatrix(this.variables.rows, times.subarray(start, start + count), true);
          forwardPass(this.diagram, q, count, values);
          const birnbaum = new Float64Array(this.variables.variables.length * count);
          backwardPass(this.diagram, q, count, values, reach, birnbaum);
          const rowOf = this.variables.rowOf;
          for (let v = 0; v < rowOf.length; v++) {
            for (let j = 0; j < count; j++) out[start + j] += birnbaum[v * count + j] * (w as Float64Array)[rowOf[v] * count + j];
          }
        }
        return out;
      },
      { relativeTolerance: QUADRATURE_TOLERANCE, signal: this.signal },
    );
    return { pfh: result.integral / this.missionHours, relativeError: result.integral > 0 ? result.errorEstimate / result.integral : 0 };
  }

  /** Minimal cut sets through the gates, dropping sets whose product of values is below the cutoff. */
  cutSets(values: Float64Array, options: CutSetBoundOptions = {}): CutSetBounds {
    return cutSetBounds(this.model, this.variables, values, options);
  }

  /** Each variable's mean unavailability on a coarse grid (200 points and every breakpoint), for ranking. */
  meanUnavailability(): Float64Array {
    const { hours, fromLeft } = curveTimes(this.missionHours, 200, this.edges);
    const { q } = variableMatrix(this.variables.rows, hours, false, fromLeft);
    const count = hours.length;
    return Float64Array.from(this.variables.rowOf, (row) => {
      let sum = 0;
      for (let j = 0; j < count; j++) sum += q[row * count + j];
      return sum / count;
    });
  }

  /**
   * The averages of P(top) with each gate fixed failed and fixed working, on a fixed partition (the
   * events' q matrix at the partition's times is computed once and shared by every gate).
   */
  averagesWithGatesFixed(gateIds: readonly string[], rule: PartitionRule): { failed: number; working: number }[] {
    const { q } = variableMatrix(this.variables.rows, rule.times, false);
    const count = rule.times.length;
    return gateIds.map((gateId) => {
      throwIfAborted(this.signal);
      const [failed, working] = [true, false].map((state) => {
        const root = this.tree.topWithGateFixed(gateId, state);
        const diagram = flatten(this.tree.bdd, root, this.tree.variableAt, this.variables.rowOf);
        const values = new Float64Array(diagram.size * count);
        return rule.integrate(forwardPass(diagram, q, count, values)).integral / this.missionHours;
      });
      return { failed, working };
    });
  }
}
