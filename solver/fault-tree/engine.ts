import type { FaultTreeModel } from '../../shared/model-file.js';
import { throwIfAborted } from '../common/abort.js';
import { integrateAdaptive, kronrodOnPartition, type PartitionRule } from '../common/quadrature.js';
import { curveTimes } from '../common/time-grid.js';
import { BddNodeLimitError } from './bdd.js';
import { buildTree, type BuiltTree } from './build.js';
import { attach, backwardIntegrals, fillTable, flatten, forwardAttached, forwardPass, variableMatrix, type AttachedDiagram, type FlatDiagram } from './evaluate.js';
import type { EventTimeline } from '../events/event-timeline.js';
import { minimalCutSets, type MinimalCutSetOptions, type MinimalCutSets } from './minimal-cut-sets.js';
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
  /** Split the tree into modules, each with its own diagram (default true; see buildTree). */
  readonly modular?: boolean;
}

export interface ItemAverages {
  /** Time integral of Birnbaum importance, per model variable, then per module (see BuiltTree.modules). */
  readonly birnbaum: Float64Array;
  /** Time integral of q_v times Birnbaum importance, per model variable, then per module. */
  readonly qTimesBirnbaum: Float64Array;
}

/** Called per batch of a pass over quadrature times; start is the batch's first index (0 starts a pass). */
export type CutSetBatchCallback = (q: Float64Array, count: number, weights: Float64Array, start: number) => void;

/** A gate that is not a module: the diagram of the module holding it, rebuilt with the gate failed and working. */
export interface FixedGate {
  readonly gateId: string;
  readonly module: number;
  readonly failed: AttachedDiagram;
  readonly working: AttachedDiagram;
}

/** PFH, PFDavg and the importance integrals of one pass over a partition's Kronrod times. */
export interface FrequencyAndImportance {
  readonly pfh: number;
  readonly relativeError: number;
  /** PFDavg on the same partition and its Kronrod-Gauss error estimate, relative. */
  readonly pfdAvg: number;
  readonly pfdRelativeError: number;
  readonly averages: ItemAverages;
  /**
   * Per fixed gate (in the order given), the time integrals of P(top | gate failed) - P(top) and of
   * P(top | gate working) - P(top).
   */
  readonly fixedGateShifts: { readonly failed: number; readonly working: number }[];
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
 * The exact fault-tree engine of one model: the modules' decision diagrams built once, then evaluated at
 * batches of time points. Each stage is a method so that the benchmark can time it.
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
  /** Scratch tables kept between calls (the passes are synchronous, so one set serves them all). */
  private readonly buffers: Float64Array[] = [];

  constructor(
    readonly model: FaultTreeModel,
    options: EngineOptions = {},
  ) {
    this.signal = options.signal;
    this.missionHours = model.mission.hours;
    this.variables = options.variables ?? compileVariables(model);
    throwIfAborted(this.signal);
    this.tree = buildTree(model, this.variables, { nodeLimit: options.nodeLimit ?? 2_000_000, modular: options.modular });
    this.diagram = flatten(this.tree.bdd, this.tree.modules, this.tree.variableAt, this.variables.rowOf, this.variables.rows);
    const points = new Set<number>([0, this.missionHours]);
    for (const timeline of this.variables.rows) {
      for (const time of timeline.breakpoints) if (time > 0 && time < this.missionHours) points.add(time);
    }
    this.edges = Float64Array.from([...points].sort((a, b) => a - b));
    this.quadratureEdges = splitForRepair(this.edges, this.variables.rows);
    this.batch = Math.max(8, Math.min(4096, Math.floor((options.scratchDoubles ?? 2 ** 21) / this.diagram.size)));
  }

  /** Nodes of the modules' diagrams (OR modules' chains included). */
  get nodeCount(): number {
    return this.diagram.diagramNodes;
  }

  /** Node rows swept per time point (the OR modules are filled with the timelines instead). */
  get nodeRows(): number {
    return this.diagram.size - this.diagram.firstNode;
  }

  /**
   * Node evaluations a full solve needs, about: the curve, then the quadrature (15 times per interval,
   * a forward pass for PFDavg and a forward and a backward pass for PFH).
   */
  expectedWork(timePoints: number): number {
    return (this.nodeRows + this.diagram.memberVariable.length) * (timePoints + 2 * this.edges.length + 15 * this.quadratureEdges.length * 4);
  }

  /** Scratch buffer number `index`, of at least `doubles` doubles, reused from call to call (contents undefined). */
  private scratch(index: number, doubles: number): Float64Array {
    const known = this.buffers[index];
    if (known && known.length >= doubles) return known;
    const buffer = new Float64Array(doubles);
    this.buffers[index] = buffer;
    return buffer;
  }

  /** P(top) at each time (the left limit where fromLeft[j] is 1), in batches. */
  topProbability(times: Float64Array, fromLeft?: Uint8Array): Float64Array {
    const out = new Float64Array(times.length);
    const values = this.scratch(0, this.diagram.size * this.batch);
    for (let start = 0; start < times.length; start += this.batch) {
      throwIfAborted(this.signal);
      const slice = times.subarray(start, Math.min(times.length, start + this.batch));
      fillTable(this.diagram, this.variables.rows, slice, values, undefined, fromLeft?.subarray(start, start + slice.length));
      out.set(forwardPass(this.diagram, values, slice.length), start);
    }
    return out;
  }

  /**
   * The top event's failure frequency w(t) = sum_v B_v(t) w_v(t) at each time (the left limit where
   * fromLeft[j] is 1), with P(top) at the same times; see backwardIntegrals.
   */
  topFrequency(times: Float64Array, fromLeft?: Uint8Array): { pfd: Float64Array; frequency: Float64Array } {
    const pfd = new Float64Array(times.length);
    const frequency = new Float64Array(times.length);
    const batch = Math.max(8, Math.floor(this.batch / 2));
    const size = this.diagram.size;
    const values = this.scratch(0, size * batch);
    const reach = this.scratch(1, size * batch);
    const w = this.scratch(2, (this.diagram.firstNode - 2) * batch);
    const extended = this.variables.variables.length + this.tree.modules.length;
    const unused = [new Float64Array(extended), new Float64Array(extended)];
    const noWeights = new Float64Array(batch);
    for (let start = 0; start < times.length; start += batch) {
      throwIfAborted(this.signal);
      const count = Math.min(batch, times.length - start);
      const slice = times.subarray(start, start + count);
      fillTable(this.diagram, this.variables.rows, slice, values, w, fromLeft?.subarray(start, start + count));
      pfd.set(forwardPass(this.diagram, values, count), start);
      backwardIntegrals(this.diagram, values, w, count, reach, noWeights, unused[0], unused[1], frequency.subarray(start, start + count), false);
    }
    return { pfd, frequency };
  }

  /** The curve: the uniform grid and every breakpoint, each breakpoint twice (left limit, then value). */
  curve(timePoints: number, withFrequency = false): { hours: Float64Array; pfd: Float64Array; frequency?: Float64Array } {
    const { hours, fromLeft } = curveTimes(this.missionHours, timePoints, this.edges);
    if (!withFrequency) return { hours, pfd: this.topProbability(hours, fromLeft) };
    return { hours, ...this.topFrequency(hours, fromLeft) };
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
   * The gates that are not modules, each with the diagram of the module holding it rebuilt with the
   * gate failed and working (their nodes below the gate are the table's own rows). Modules need none: a
   * module's importance comes from the backward pass like a variable's. Stops, returning undefined, as
   * soon as the rebuilt diagrams together need more than maxNodes new nodes (or the Bdd its node limit),
   * so a tree whose gate importance is beyond the budget costs little to turn down.
   */
  fixedGates(gateIds: readonly string[], maxNodes = Infinity): FixedGate[] | undefined {
    const fixed: FixedGate[] = [];
    const { bdd, variableAt } = this.tree;
    let nodes = 0;
    try {
      for (const gateId of gateIds) {
        const place = this.tree.gatePlace.get(gateId);
        if (!place || place.isModule) continue;
        throwIfAborted(this.signal);
        const [failed, working] = [true, false].map((state) => attach(bdd, this.tree.rootWithGateFixed(gateId, state), this.diagram, variableAt, this.variables.rowOf));
        nodes += failed.size - failed.firstNode + working.size - working.firstNode;
        if (nodes > maxNodes) return undefined;
        fixed.push({ gateId, module: place.module, failed, working });
      }
    } catch (error) {
      if (error instanceof BddNodeLimitError) return undefined;
      throw error;
    } finally {
      bdd.clearCaches();
    }
    return fixed;
  }

  /**
   * PFH and the time integrals of every variable's (and module's) Birnbaum importance on a fixed
   * partition: one forward and one backward pass per batch. The top's failure frequency is
   * sum_v B_v(t) w_v(t), the failure frequency of a coherent structure of independent components
   * (Rausand & Hoyland, System Reliability Theory, 2nd ed., chapter on system reliability, from memory).
   * The same passes give P(top) at the partition's times, so PFDavg on this partition comes with it.
   * A gate G that is not a module changes the top only through the module M holding it, and P(top) is
   * linear in P(M), so P(top | G fixed) - P(top) = B_M(t) (P(M | G fixed) - P(M)): each fixed gate costs
   * a forward pass over its rebuilt nodes only.
   * @param onCutSetBatch called per batch with the q matrix (one row per timeline, see rowOf), the batch
   *   length, the weights and the index of the batch's first time (0 starts a pass).
   */
  frequencyAndImportance(rule: PartitionRule, onCutSetBatch?: CutSetBatchCallback, fixedGates: readonly FixedGate[] = []): FrequencyAndImportance {
    const { times, weights } = rule;
    const extended = this.variables.variables.length + this.tree.modules.length;
    const birnbaumIntegral = new Float64Array(extended);
    const qTimesBirnbaumIntegral = new Float64Array(extended);
    const frequency = new Float64Array(times.length);
    const top = new Float64Array(times.length);
    const diagram = this.diagram;
    const timelineRows = this.variables.rows.length;
    const batch = this.batch;
    const rows = fixedGates.reduce((most, gate) => Math.max(most, gate.failed.size, gate.working.size), diagram.size);
    const values = this.scratch(0, rows * batch);
    const reach = this.scratch(1, diagram.size * batch);
    const w = this.scratch(2, (diagram.firstNode - 2) * batch);
    const shifts = fixedGates.map(() => ({ failed: 0, working: 0 }));
    for (let start = 0; start < times.length; start += batch) {
      throwIfAborted(this.signal);
      const count = Math.min(batch, times.length - start);
      const slice = times.subarray(start, start + count);
      fillTable(diagram, this.variables.rows, slice, values, w, undefined, true);
      top.set(forwardPass(diagram, values, count), start);
      const batchWeights = weights.subarray(start, start + count);
      backwardIntegrals(diagram, values, w, count, reach, batchWeights, birnbaumIntegral, qTimesBirnbaumIntegral, frequency.subarray(start, start + count));
      onCutSetBatch?.(values.subarray(2 * count, (2 + timelineRows) * count), count, batchWeights, start);
      fixedGates.forEach((gate, index) => {
        const moduleAt = diagram.moduleRoots[gate.module] * count;
        for (const state of ['failed', 'working'] as const) {
          const fixed = forwardAttached(gate[state], values, count);
          let sum = 0;
          for (let j = 0; j < count; j++) sum += batchWeights[j] * reach[moduleAt + j] * (fixed[j] - values[moduleAt + j]);
          shifts[index][state] += sum;
        }
      });
    }
    const integral = rule.integrate(frequency);
    const unavailability = rule.integrate(top);
    return {
      pfh: integral.integral / this.missionHours,
      relativeError: integral.integral > 0 ? integral.errorEstimate / integral.integral : 0,
      pfdAvg: unavailability.integral / this.missionHours,
      pfdRelativeError: unavailability.integral > 0 ? unavailability.errorEstimate / unavailability.integral : 0,
      averages: { birnbaum: birnbaumIntegral, qTimesBirnbaum: qTimesBirnbaumIntegral },
      fixedGateShifts: shifts,
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
  averages(onCutSetBatch?: CutSetBatchCallback, fixedGates: readonly FixedGate[] = []): EngineAverages {
    const rule = kronrodOnPartition(this.quadratureEdges);
    const shared = this.frequencyAndImportance(rule, onCutSetBatch, fixedGates);
    if (shared.pfdRelativeError <= QUADRATURE_TOLERANCE) {
      return { ...shared, partition: this.quadratureEdges, rule };
    }
    const average = this.pfdAverage();
    const refined = kronrodOnPartition(average.partition);
    const frequency = this.frequencyAndImportance(refined, onCutSetBatch, fixedGates);
    return { ...frequency, pfdAvg: average.pfdAvg, pfdRelativeError: average.relativeError, partition: average.partition, rule: refined };
  }

  /** PFH by its own adaptive integral, for when the PFDavg partition does not reach the tolerance. */
  pfhAdaptive(): { pfh: number; relativeError: number } {
    const result = integrateAdaptive(this.quadratureEdges, (times) => this.topFrequency(times).frequency, {
      relativeTolerance: QUADRATURE_TOLERANCE,
      signal: this.signal,
    });
    return { pfh: result.integral / this.missionHours, relativeError: result.integral > 0 ? result.errorEstimate / result.integral : 0 };
  }

  /**
   * PFDavg with each gate's output fixed failed and fixed working, from a pass's integrals: a module's
   * from its Birnbaum integrals, P(top | M failed) = P(top) + (1 - P(M)) B_M and P(top | M working) =
   * P(top) - P(M) B_M (P(top) is linear in P(M)); another gate's from the shifts of its rebuilt diagrams.
   * A gate not under the top changes nothing. Returns undefined for a gate that is not a module and not
   * among the pass's fixed gates.
   */
  gateAverages(result: FrequencyAndImportance, fixedGates: readonly FixedGate[], gateIds: readonly string[]): ({ failed: number; working: number } | undefined)[] {
    const mission = this.missionHours;
    const fixedIndex = new Map(fixedGates.map((gate, index) => [gate.gateId, index]));
    return gateIds.map((gateId) => {
      const place = this.tree.gatePlace.get(gateId);
      if (!place) return { failed: result.pfdAvg, working: result.pfdAvg };
      if (place.isModule) {
        const variable = this.tree.modules[place.module].variable;
        const reduction = result.averages.qTimesBirnbaum[variable] / mission;
        return { failed: result.pfdAvg + result.averages.birnbaum[variable] / mission - reduction, working: result.pfdAvg - reduction };
      }
      const index = fixedIndex.get(gateId);
      if (index === undefined) return undefined;
      const shift = result.fixedGateShifts[index];
      return { failed: result.pfdAvg + shift.failed / mission, working: result.pfdAvg + shift.working / mission };
    });
  }

  /** Minimal cut sets from the modules' diagrams (see minimalCutSets), ranked by the values given. */
  cutSets(values: Float64Array, options: MinimalCutSetOptions = {}): MinimalCutSets {
    return minimalCutSets(this.tree, this.variables.variables.length, values, options);
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
}
