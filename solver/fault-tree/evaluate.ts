import { evaluateEventTimeline } from '../events/event-timeline.js';
import type { Bdd } from './bdd.js';
import type { DiagramModule } from './build.js';
import type { EventTimeline } from '../events/event-timeline.js';

/**
 * The modules' diagrams flattened into one table for evaluation. Every row is a vector over the time
 * points of a batch: rows 0 and 1 are FALSE and TRUE, the next rows hold the events' q(t) (one per
 * distinct timeline), then come the diagram nodes, each module's after those of its child modules. A node
 * reads "if its variable then high else low"; source is the row holding that variable's probability:
 * a timeline's q row, or the root row of the child module it tests. So one bottom-up sweep evaluates every
 * module in turn, and one top-down sweep passes each module's importance down into its diagram.
 */
export interface FlatDiagram {
  /** Rows of the table. */
  readonly size: number;
  /** First node row: 2 + the number of timeline rows. */
  readonly firstNode: number;
  /** Per node row: the variable tested (a model variable, or variable count + module index). */
  readonly variable: Int32Array;
  readonly source: Int32Array;
  readonly low: Int32Array;
  readonly high: Int32Array;
  /** Per node row: 1 when the node tests a child module. */
  readonly testsModule: Uint8Array;
  /** Root row of each module; the last is the top event. */
  readonly moduleRoots: Int32Array;
  readonly root: number;
  /** The row of each diagram node in the table. */
  readonly rowOfNode: ReadonlyMap<number, number>;
}

/**
 * A diagram evaluated after a main table: its rows continue the table's numbering (from the table's
 * size on), and it reuses every row of the table whose function it shares.
 */
export interface AttachedDiagram {
  readonly firstNode: number;
  readonly size: number;
  readonly source: Int32Array;
  readonly low: Int32Array;
  readonly high: Int32Array;
  readonly root: number;
}

/** Nodes of the diagrams below the roots, children before parents (Bdd.reachable of each, merged). */
function nodesBelow(bdd: Bdd, roots: readonly number[], known: ReadonlyMap<number, number>): number[] {
  const seen = new Set<number>();
  const nodes: number[] = [];
  for (const root of roots) {
    for (const node of bdd.reachable(root)) {
      if (node < 2 || known.has(node) || seen.has(node)) continue;
      seen.add(node);
      nodes.push(node);
    }
  }
  return nodes.sort((a, b) => a - b);
}

/**
 * Flattens the modules' diagrams into one table.
 * @param variableAt the model or module variable at each diagram position.
 * @param rowOf each model variable's timeline row; timelineRows their number.
 */
export function flatten(bdd: Bdd, modules: readonly DiagramModule[], variableAt: Int32Array, rowOf: Int32Array, timelineRows: number): FlatDiagram {
  const variableCount = rowOf.length;
  const firstNode = 2 + timelineRows;
  const rowOfNode = new Map<number, number>([
    [0, 0],
    [1, 1],
  ]);
  const moduleRoots = new Int32Array(modules.length);
  const ordered: number[] = [];
  modules.forEach((module, index) => {
    for (const node of nodesBelow(bdd, [module.root], rowOfNode)) {
      rowOfNode.set(node, firstNode + ordered.length);
      ordered.push(node);
    }
    moduleRoots[index] = rowOfNode.get(module.root) as number;
  });
  const size = firstNode + ordered.length;
  const variable = new Int32Array(size).fill(-1);
  const source = new Int32Array(size).fill(-1);
  const low = new Int32Array(size);
  const high = new Int32Array(size);
  const testsModule = new Uint8Array(size);
  ordered.forEach((node, index) => {
    const row = firstNode + index;
    const tested = variableAt[bdd.variableOf(node)];
    variable[row] = tested;
    testsModule[row] = tested >= variableCount ? 1 : 0;
    source[row] = tested >= variableCount ? moduleRoots[tested - variableCount] : 2 + rowOf[tested];
    low[row] = rowOfNode.get(bdd.lowOf(node)) as number;
    high[row] = rowOfNode.get(bdd.highOf(node)) as number;
  });
  return { size, firstNode, variable, source, low, high, testsModule, moduleRoots, root: moduleRoots[modules.length - 1], rowOfNode };
}

/**
 * Flattens one more diagram over the table's variables (for instance a module rebuilt with one gate
 * fixed): only its nodes that are not rows of the table get rows, numbered from the table's size on.
 */
export function attach(bdd: Bdd, root: number, table: FlatDiagram, variableAt: Int32Array, rowOf: Int32Array): AttachedDiagram {
  const variableCount = rowOf.length;
  const nodes = nodesBelow(bdd, [root], table.rowOfNode);
  const local = new Map<number, number>();
  nodes.forEach((node, index) => local.set(node, table.size + index));
  const rowOfNode = (node: number) => table.rowOfNode.get(node) ?? (local.get(node) as number);
  const source = new Int32Array(nodes.length);
  const low = new Int32Array(nodes.length);
  const high = new Int32Array(nodes.length);
  nodes.forEach((node, index) => {
    const tested = variableAt[bdd.variableOf(node)];
    source[index] = tested >= variableCount ? table.moduleRoots[tested - variableCount] : 2 + rowOf[tested];
    low[index] = rowOfNode(bdd.lowOf(node));
    high[index] = rowOfNode(bdd.highOf(node));
  });
  return { firstNode: table.size, size: table.size + nodes.length, source, low, high, root: rowOfNode(root) };
}

/**
 * Writes every timeline's q(t) at a batch of times into the table's rows 2.. (and, when wanted, the DU
 * failure frequencies w(t) into w, one row per timeline).
 */
export function fillTimelines(rows: readonly EventTimeline[], times: Float64Array, values: Float64Array, w?: Float64Array, fromLeft?: Uint8Array): void {
  const count = times.length;
  values.fill(0, 0, count);
  values.fill(1, count, 2 * count);
  rows.forEach((timeline, index) => evaluateEventTimeline(timeline, times, values, (2 + index) * count, w, fromLeft, index * count));
}

/** Event unavailabilities (and DU failure frequencies) at a batch of times, one row per timeline. */
export function variableMatrix(
  rows: readonly EventTimeline[],
  times: Float64Array,
  withFrequency: boolean,
  fromLeft?: Uint8Array,
): { q: Float64Array; w: Float64Array | undefined } {
  const count = times.length;
  const q = new Float64Array(rows.length * count);
  const w = withFrequency ? new Float64Array(rows.length * count) : undefined;
  rows.forEach((timeline, index) => evaluateEventTimeline(timeline, times, q, index * count, w, fromLeft));
  return { q, w };
}

/** P(node) = P(low) + q (P(high) - P(low)) for rows first..end-1, in increasing order. */
function sweepUp(values: Float64Array, source: Int32Array, low: Int32Array, high: Int32Array, offset: number, first: number, end: number, count: number): void {
  for (let row = first; row < end; row++) {
    const out = row * count;
    const lowAt = low[row - offset] * count;
    const highAt = high[row - offset] * count;
    const qAt = source[row - offset] * count;
    for (let j = 0; j < count; j++) {
      const p0 = values[lowAt + j];
      values[out + j] = p0 + values[qAt + j] * (values[highAt + j] - p0);
    }
  }
}

/**
 * Every node's probability at each time of the batch (rows 2.. must hold the timelines' q, see
 * fillTimelines): one bottom-up sweep, exact under independence (Rauzy 1993, "New algorithms for fault
 * trees analysis", Reliability Engineering & System Safety 40). Returns the top's row.
 * @param values the table, size * count doubles.
 */
export function forwardPass(diagram: FlatDiagram, values: Float64Array, count: number): Float64Array {
  sweepUp(values, diagram.source, diagram.low, diagram.high, 0, diagram.firstNode, diagram.size, count);
  return values.subarray(diagram.root * count, diagram.root * count + count);
}

/**
 * Evaluates an attached diagram's own rows after the table's forward pass.
 * @param values at least attached.size * count doubles, the table's rows already evaluated.
 */
export function forwardAttached(diagram: AttachedDiagram, values: Float64Array, count: number): Float64Array {
  sweepUp(values, diagram.source, diagram.low, diagram.high, diagram.firstNode, diagram.firstNode, diagram.size, count);
  return values.subarray(diagram.root * count, diagram.root * count + count);
}

/**
 * The top-down sweep after forwardPass: each node passes its reach probability to its children, and a
 * node testing v adds B = reach (P(high) - P(low)) to v's Birnbaum importance dP(top)/dq_v (Rauzy 1993;
 * the backward pass of Dutuit & Rauzy 2001). A node testing a child module adds B to the reach of that
 * module's root, so the module's own nodes carry dP(top)/dP(module) times their own derivative (the chain
 * rule) and its variables receive their Birnbaum importance for the top. Integrated on the fly over a
 * batch of quadrature times: adds sum_j weight_j B_v(t_j) and sum_j weight_j q_v(t_j) B_v(t_j) to every
 * model and module variable's integrals, and B_v(t_j) w_v(t_j) to the top's failure frequency at t_j
 * (Rausand & Hoyland, System Reliability Theory, 2nd ed., chapter on system reliability, from memory).
 * Every term is non-negative for a coherent tree, so summing per node instead of per variable changes the
 * totals by rounding only.
 * @param reach scratch of size * count doubles, left holding each node's reach (a module root's reach is
 *   dP(top)/dP(module)).
 * @param w the timelines' DU failure frequencies, one row per timeline.
 * @param frequency out, count doubles, added to.
 */
export function backwardIntegrals(
  diagram: FlatDiagram,
  values: Float64Array,
  w: Float64Array,
  count: number,
  reach: Float64Array,
  weights: Float64Array,
  birnbaumIntegral: Float64Array,
  qTimesBirnbaumIntegral: Float64Array,
  frequency: Float64Array,
): void {
  const { variable, source, low, high, testsModule, firstNode } = diagram;
  reach.fill(0, 0, diagram.size * count);
  reach.fill(1, diagram.root * count, diagram.root * count + count);
  for (let node = diagram.size - 1; node >= firstNode; node--) {
    const at = node * count;
    const lowAt = low[node] * count;
    const highAt = high[node] * count;
    const qAt = source[node] * count;
    let sumB = 0;
    let sumQB = 0;
    if (testsModule[node] === 1) {
      for (let j = 0; j < count; j++) {
        const r = reach[at + j];
        if (r === 0) continue;
        const qj = values[qAt + j];
        reach[highAt + j] += r * qj;
        reach[lowAt + j] += r * (1 - qj);
        const b = r * (values[highAt + j] - values[lowAt + j]);
        reach[qAt + j] += b;
        const weighted = weights[j] * b;
        sumB += weighted;
        sumQB += weighted * qj;
      }
    } else {
      const wAt = qAt - 2 * count;
      for (let j = 0; j < count; j++) {
        const r = reach[at + j];
        if (r === 0) continue;
        const qj = values[qAt + j];
        reach[highAt + j] += r * qj;
        reach[lowAt + j] += r * (1 - qj);
        const b = r * (values[highAt + j] - values[lowAt + j]);
        const weighted = weights[j] * b;
        sumB += weighted;
        sumQB += weighted * qj;
        frequency[j] += b * w[wAt + j];
      }
    }
    birnbaumIntegral[variable[node]] += sumB;
    qTimesBirnbaumIntegral[variable[node]] += sumQB;
  }
}
