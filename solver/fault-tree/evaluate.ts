import { evaluateEventTimeline } from '../events/event-timeline.js';
import { evaluateForm, formAt, inOrder, orForms, repairSteps, type PiecewiseForm } from '../events/piecewise.js';
import type { Bdd } from './bdd.js';
import type { DiagramModule } from './build.js';
import type { EventTimeline } from '../events/event-timeline.js';

/**
 * The modules' diagrams flattened into one table for evaluation. Every row is a vector over the time
 * points of a batch: rows 0 and 1 are FALSE and TRUE, the next rows hold the events' q(t) (one per
 * distinct timeline), then one row per OR module (a module whose diagram is a chain of model variables,
 * such as a channel's device, I/O card and relay), then the diagram nodes, each module's after those of
 * its child modules. An OR module's row is 1 - prod(1 - q_i) over its members, filled with the timelines
 * (fillTable) instead of a node per member. A node reads "if its variable then high else low"; source is
 * the row holding that variable's probability: a timeline's q row, or the row of the child module it
 * tests. So one bottom-up sweep evaluates every module in turn, and one top-down sweep passes each
 * module's importance down into its diagram.
 */
export interface FlatDiagram {
  /** Rows of the table. */
  readonly size: number;
  /** First OR-module row: 2 + the number of timeline rows. */
  readonly firstComposite: number;
  /** First node row: firstComposite + the number of OR modules. */
  readonly firstNode: number;
  /** OR module c's members are memberStart[c] .. memberStart[c + 1] - 1 of the member arrays. */
  readonly memberStart: Int32Array;
  /** Each member's model variable and its timeline row (an index into the timelines, not a table row). */
  readonly memberVariable: Int32Array;
  readonly memberRow: Int32Array;
  /** Per OR module: the sum of its members' DU rates, its failure frequency being that times 1 - q. */
  readonly compositeRate: Float64Array;
  /** Per OR module: its q(t), the OR of its members' forms (see orForms). */
  readonly compositeForms: readonly PiecewiseForm[];
  /** 1 for each timeline a node reads; 2 for one only OR modules' members are (needed for their importance only). */
  readonly usedRows: Uint8Array;
  /** Diagram nodes of the modules, OR modules' chains included (the diagram's size). */
  readonly diagramNodes: number;
  /** Model variables; module m is variable variableCount + m. */
  readonly variableCount: number;
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

/** The model variables of a module's diagram when it is a chain "x1 or x2 or ..." (each node's high TRUE), else undefined. */
function orChain(bdd: Bdd, root: number, variableAt: Int32Array, variableCount: number): number[] | undefined {
  const members: number[] = [];
  for (let node = root; node !== 0; node = bdd.lowOf(node)) {
    const tested = variableAt[bdd.variableOf(node)];
    if (node === 1 || bdd.highOf(node) !== 1 || tested >= variableCount) return undefined;
    members.push(tested);
  }
  return members.length >= 2 ? members : undefined;
}

/**
 * Flattens the modules' diagrams into one table.
 * @param variableAt the model or module variable at each diagram position.
 * @param rowOf each model variable's timeline row; timelines the distinct timelines.
 */
export function flatten(bdd: Bdd, modules: readonly DiagramModule[], variableAt: Int32Array, rowOf: Int32Array, timelines: readonly EventTimeline[]): FlatDiagram {
  const variableCount = rowOf.length;
  const timelineRows = timelines.length;
  const firstComposite = 2 + timelineRows;
  const chains = modules.map((module) => orChain(bdd, module.root, variableAt, variableCount));
  const composites = chains.filter((chain) => chain !== undefined).length;
  const firstNode = firstComposite + composites;
  const rowOfNode = new Map<number, number>([
    [0, 0],
    [1, 1],
  ]);
  const moduleRoots = new Int32Array(modules.length);
  const memberStart = new Int32Array(composites + 1);
  const memberVariable: number[] = [];
  const compositeRate = new Float64Array(composites);
  const usedRows = new Uint8Array(timelineRows);
  const compositeForms: PiecewiseForm[] = [];
  const ordered: number[] = [];
  let composite = 0;
  let diagramNodes = 0;
  modules.forEach((module, index) => {
    const chain = chains[index];
    if (chain) {
      const row = firstComposite + composite;
      rowOfNode.set(module.root, row);
      moduleRoots[index] = row;
      memberVariable.push(...chain);
      for (const member of chain) {
        compositeRate[composite] += timelines[rowOf[member]].lambdaDU;
        if (usedRows[rowOf[member]] === 0) usedRows[rowOf[member]] = 2;
      }
      compositeForms.push(orOfTimelines(chain.map((member) => timelines[rowOf[member]])));
      memberStart[++composite] = memberVariable.length;
      diagramNodes += chain.length;
      return;
    }
    for (const node of nodesBelow(bdd, [module.root], rowOfNode)) {
      rowOfNode.set(node, firstNode + ordered.length);
      ordered.push(node);
    }
    moduleRoots[index] = rowOfNode.get(module.root) as number;
  });
  diagramNodes += ordered.length;
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
    if (tested < variableCount) usedRows[rowOf[tested]] = 1;
    low[row] = rowOfNode.get(bdd.lowOf(node)) as number;
    high[row] = rowOfNode.get(bdd.highOf(node)) as number;
  });
  // A node "if module M then TRUE else FALSE" (the last of a chain over modules, or a module that is just
  // its child) has M's own values and reach: it gets no row, those who read it read M's row instead.
  const dropped = (row: number) => row >= firstNode && testsModule[row] === 1 && low[row] === 0 && high[row] === 1;
  const target = new Int32Array(size);
  let kept = firstNode;
  for (let row = 0; row < size; row++) target[row] = row < firstNode ? row : dropped(row) ? target[source[row]] : kept++;
  const keep = <T extends Int32Array | Uint8Array>(array: T, map: boolean): T => {
    const out = new (array.constructor as new (length: number) => T)(kept);
    for (let row = 0; row < size; row++) if (!dropped(row)) out[target[row]] = map && array[row] >= 0 ? target[array[row]] : array[row];
    return out;
  };
  for (const [node, row] of rowOfNode) rowOfNode.set(node, target[row]);
  return {
    size: kept,
    firstComposite,
    firstNode,
    memberStart,
    memberVariable: Int32Array.from(memberVariable),
    memberRow: Int32Array.from(memberVariable, (member) => rowOf[member]),
    compositeRate,
    compositeForms,
    usedRows,
    diagramNodes,
    variableCount,
    variable: keep(variable, false),
    source: keep(source, true),
    low: keep(low, true),
    high: keep(high, true),
    testsModule: keep(testsModule, false),
    moduleRoots: moduleRoots.map((row) => target[row]),
    root: target[moduleRoots[modules.length - 1]],
    rowOfNode,
  };
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
 * Fills the table's rows below the nodes at a batch of times: the q(t) of every timeline a node reads
 * into rows 2.., and each OR module's q(t) from its form (and, when wanted, the failure frequencies into
 * w, one row per table row from row 2 on: a timeline's lambdaDU (1 - q), an OR module's sum of its
 * members' lambdaDU times 1 - q, which is sum_i w_i prod_{j != i} (1 - q_j), the members' frequencies
 * through the module).
 * @param members also fill the timelines only OR modules' members have (for their importance); the OR
 *   modules are then combined from them.
 */
export function fillTable(
  diagram: FlatDiagram,
  rows: readonly EventTimeline[],
  times: Float64Array,
  values: Float64Array,
  w?: Float64Array,
  fromLeft?: Uint8Array,
  members = false,
): void {
  const count = times.length;
  values.fill(0, 0, count);
  values.fill(1, count, 2 * count);
  const used = diagram.usedRows;
  const ordered = inOrder(times, fromLeft);
  const steps = new SharedSteps(times);
  for (let index = 0; index < rows.length; index++) {
    if (used[index] === 0 || (used[index] === 2 && !members)) continue;
    const timeline = rows[index];
    // Only the timelines a node reads need their frequency (members count through their OR module's).
    evaluateEventTimeline(timeline, times, values, (2 + index) * count, used[index] === 1 ? w : undefined, fromLeft, index * count, ordered, steps.of(timeline.form.mu));
  }
  const { compositeForms, compositeRate, firstComposite, memberStart, memberRow } = diagram;
  for (let composite = 0; composite < compositeForms.length; composite++) {
    const form = compositeForms[composite];
    const row = firstComposite + composite;
    const out = row * count;
    if (!members) {
      evaluateForm(form, times, values, out, compositeRate[composite], w, fromLeft, (row - 2) * count, ordered, steps.of(form.mu));
      continue;
    }
    // The members are filled already: their OR, 1 - prod(1 - q_i), costs less than the module's form.
    const first = memberStart[composite];
    const size = memberStart[composite + 1] - first;
    const q0At = (2 + memberRow[first]) * count;
    const q1At = (2 + memberRow[first + 1]) * count;
    if (size === 2 || size === 3) {
      // In one loop (the usual channel modules).
      const q2At = size === 3 ? (2 + memberRow[first + 2]) * count : -1;
      for (let j = 0; j < count; j++) {
        let p = values[q0At + j];
        p += values[q1At + j] * (1 - p);
        if (q2At >= 0) p += values[q2At + j] * (1 - p);
        values[out + j] = p;
      }
    } else {
      values.copyWithin(out, q0At, q0At + count);
      for (let member = first + 1; member < first + size; member++) {
        const qAt = (2 + memberRow[member]) * count;
        for (let j = 0; j < count; j++) {
          const p = values[out + j];
          values[out + j] = p + values[qAt + j] * (1 - p);
        }
      }
    }
    if (w) {
      const rate = compositeRate[composite];
      const wAt = out - 2 * count;
      for (let j = 0; j < count; j++) w[wAt + j] = rate * (1 - values[out + j]);
    }
  }
}

/** The OR of independent events' timelines as one form (an OR module's q(t)). */
function orOfTimelines(timelines: readonly EventTimeline[]): PiecewiseForm {
  const mu = timelines.find((timeline) => timeline.form.mu !== Infinity)?.form.mu ?? Infinity;
  return orForms(
    timelines.map((timeline) => timeline.form),
    mu,
    (t, fromLeft) => timelines.reduce((q, timeline) => {
      const qi = formAt(timeline.form, t, fromLeft);
      return q + qi - q * qi;
    }, 0),
  );
}

/** The repair steps of a batch of times (see repairSteps), computed once per repair rate and shared by the timelines. */
class SharedSteps {
  private readonly byRate = new Map<number, Float64Array>();

  constructor(private readonly times: Float64Array) {}

  of(mu: number): Float64Array | undefined {
    if (mu === Infinity) return undefined;
    let steps = this.byRate.get(mu);
    if (!steps) {
      steps = repairSteps(this.times, mu);
      this.byRate.set(mu, steps);
    }
    return steps;
  }
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
  const ordered = inOrder(times, fromLeft);
  const steps = new SharedSteps(times);
  rows.forEach((timeline, index) => evaluateEventTimeline(timeline, times, q, index * count, w, fromLeft, index * count, ordered, steps.of(timeline.form.mu)));
  return { q, w };
}

/**
 * P(node) = P(low) + q (P(high) - P(low)) for rows first..end-1, in increasing order; a node whose high
 * child is TRUE (an OR) reads P(low) + q (1 - P(low)), one whose low child is FALSE (an AND) q P(high):
 * one row fewer to read. The loops take four times per step (a fifth less time than one by one).
 */
function sweepUp(values: Float64Array, source: Int32Array, low: Int32Array, high: Int32Array, offset: number, first: number, end: number, count: number): void {
  const fours = count & ~3;
  for (let row = first; row < end; row++) {
    const out = row * count;
    const lowRow = low[row - offset];
    const highRow = high[row - offset];
    const qAt = source[row - offset] * count;
    let j = 0;
    if (highRow === 1) {
      const lowAt = lowRow * count;
      for (; j < fours; j += 4) {
        const p0 = values[lowAt + j];
        const p1 = values[lowAt + j + 1];
        const p2 = values[lowAt + j + 2];
        const p3 = values[lowAt + j + 3];
        values[out + j] = p0 + values[qAt + j] * (1 - p0);
        values[out + j + 1] = p1 + values[qAt + j + 1] * (1 - p1);
        values[out + j + 2] = p2 + values[qAt + j + 2] * (1 - p2);
        values[out + j + 3] = p3 + values[qAt + j + 3] * (1 - p3);
      }
      for (; j < count; j++) {
        const p0 = values[lowAt + j];
        values[out + j] = p0 + values[qAt + j] * (1 - p0);
      }
    } else if (lowRow === 0) {
      const highAt = highRow * count;
      for (; j < fours; j += 4) {
        values[out + j] = values[qAt + j] * values[highAt + j];
        values[out + j + 1] = values[qAt + j + 1] * values[highAt + j + 1];
        values[out + j + 2] = values[qAt + j + 2] * values[highAt + j + 2];
        values[out + j + 3] = values[qAt + j + 3] * values[highAt + j + 3];
      }
      for (; j < count; j++) values[out + j] = values[qAt + j] * values[highAt + j];
    } else {
      const lowAt = lowRow * count;
      const highAt = highRow * count;
      for (; j < fours; j += 4) {
        const p0 = values[lowAt + j];
        const p1 = values[lowAt + j + 1];
        const p2 = values[lowAt + j + 2];
        const p3 = values[lowAt + j + 3];
        values[out + j] = p0 + values[qAt + j] * (values[highAt + j] - p0);
        values[out + j + 1] = p1 + values[qAt + j + 1] * (values[highAt + j + 1] - p1);
        values[out + j + 2] = p2 + values[qAt + j + 2] * (values[highAt + j + 2] - p2);
        values[out + j + 3] = p3 + values[qAt + j + 3] * (values[highAt + j + 3] - p3);
      }
      for (; j < count; j++) {
        const p0 = values[lowAt + j];
        values[out + j] = p0 + values[qAt + j] * (values[highAt + j] - p0);
      }
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
 * An OR module's row (see FlatDiagram) receives its reach from the nodes testing it; it adds reach times its
 * frequency to the top's, and, when importance is wanted, passes B_i = reach prod_{j != i} (1 - q_j) to
 * each member i (the chain rule through 1 - prod(1 - q_j)).
 * @param reach scratch of size * count doubles, left holding each node's reach (a module root's reach is
 *   dP(top)/dP(module)).
 * @param w the failure frequencies, one row per table row from row 2 on (see fillTable).
 * @param frequency out, count doubles, added to.
 * @param importance false when only the frequency is wanted (the integrals are then left alone).
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
  importance = true,
): void {
  const { variable, source, low, high, testsModule, firstNode, firstComposite } = diagram;
  if (ONES.length < count) ONES = new Float64Array(count).fill(1);
  const ones = ONES;
  // Only OR-module and node rows receive reach (and the FALSE row, never read).
  reach.fill(0, firstComposite * count, diagram.size * count);
  reach.fill(1, diagram.root * count, diagram.root * count + count);
  for (let node = diagram.size - 1; node >= firstNode; node--) {
    const at = node * count;
    const lowRow = low[node];
    const highRow = high[node];
    const qAt = source[node] * count;
    // A node testing a module adds B to that module's reach (B times a row of ones); one testing a
    // variable adds B w to the frequency.
    const module = testsModule[node] === 1;
    const target = module ? reach : frequency;
    const targetAt = module ? qAt : 0;
    const factor = module ? ones : w;
    const factorAt = module ? 0 : qAt - 2 * count;
    const sums =
      highRow === 1
        ? sweepOr(values, reach, weights, target, targetAt, factor, factorAt, at, lowRow * count, qAt, count)
        : lowRow === 0
          ? sweepAnd(values, reach, weights, target, targetAt, factor, factorAt, at, highRow * count, qAt, count)
          : sweepNode(values, reach, weights, target, targetAt, factor, factorAt, at, lowRow * count, highRow * count, qAt, count);
    if (importance && !module) {
      birnbaumIntegral[variable[node]] += sums[0];
      qTimesBirnbaumIntegral[variable[node]] += sums[1];
    }
  }
  if (importance) {
    // A module's Birnbaum importance dP(top)/dP(module) is the reach its root row has gathered.
    const { moduleRoots, variableCount } = diagram;
    for (let index = 0; index < moduleRoots.length; index++) {
      const at = moduleRoots[index] * count;
      let sumB = 0;
      let sumQB = 0;
      for (let j = 0; j < count; j++) {
        const weighted = weights[j] * reach[at + j];
        sumB += weighted;
        sumQB += weighted * values[at + j];
      }
      birnbaumIntegral[variableCount + index] += sumB;
      qTimesBirnbaumIntegral[variableCount + index] += sumQB;
    }
  }
  const { memberStart } = diagram;
  for (let composite = 0; composite + 1 < memberStart.length; composite++) {
    const at = (firstComposite + composite) * count;
    const wAt = at - 2 * count;
    for (let j = 0; j < count; j++) frequency[j] += reach[at + j] * w[wAt + j];
    if (importance) memberImportance(diagram, composite, values, reach, weights, count, birnbaumIntegral, qTimesBirnbaumIntegral);
  }
}

let memberScratch = new Float64Array(0);

/**
 * The members' Birnbaum importance through their OR module: B_i = reach prod_{k != i} (1 - q_k), from
 * the products of the members before i (one row each) and a running product of those after.
 */
function memberImportance(
  diagram: FlatDiagram,
  composite: number,
  values: Float64Array,
  reach: Float64Array,
  weights: Float64Array,
  count: number,
  birnbaumIntegral: Float64Array,
  qTimesBirnbaumIntegral: Float64Array,
): void {
  const { memberStart, memberRow, memberVariable, firstComposite } = diagram;
  const first = memberStart[composite];
  const members = memberStart[composite + 1] - first;
  const at = (firstComposite + composite) * count;
  if (members === 2 || members === 3) {
    // The usual channel modules, in one loop with the products in registers.
    const q0At = (2 + memberRow[first]) * count;
    const q1At = (2 + memberRow[first + 1]) * count;
    const q2At = members === 3 ? (2 + memberRow[first + 2]) * count : -1;
    let b0 = 0;
    let b1 = 0;
    let b2 = 0;
    let qb0 = 0;
    let qb1 = 0;
    let qb2 = 0;
    for (let j = 0; j < count; j++) {
      const rw = reach[at + j] * weights[j];
      const q0 = values[q0At + j];
      const q1 = values[q1At + j];
      const q2 = q2At < 0 ? 0 : values[q2At + j];
      const w0 = rw * (1 - q1) * (1 - q2);
      const w1 = rw * (1 - q0) * (1 - q2);
      const w2 = rw * (1 - q0) * (1 - q1);
      b0 += w0;
      qb0 += w0 * q0;
      b1 += w1;
      qb1 += w1 * q1;
      b2 += w2;
      qb2 += w2 * q2;
    }
    birnbaumIntegral[memberVariable[first]] += b0;
    qTimesBirnbaumIntegral[memberVariable[first]] += qb0;
    birnbaumIntegral[memberVariable[first + 1]] += b1;
    qTimesBirnbaumIntegral[memberVariable[first + 1]] += qb1;
    if (members === 3) {
      birnbaumIntegral[memberVariable[first + 2]] += b2;
      qTimesBirnbaumIntegral[memberVariable[first + 2]] += qb2;
    }
    return;
  }
  if (memberScratch.length < (members + 1) * count) memberScratch = new Float64Array((members + 1) * count);
  const before = memberScratch;
  // before[i] = reach prod_{k < i} (1 - q_k); the last row then runs as the product of those after.
  before.set(reach.subarray(at, at + count), 0);
  for (let i = 1; i < members; i++) {
    const qAt = (2 + memberRow[first + i - 1]) * count;
    const from = (i - 1) * count;
    const to = i * count;
    for (let j = 0; j < count; j++) before[to + j] = before[from + j] * (1 - values[qAt + j]);
  }
  const after = members * count;
  before.fill(1, after, after + count);
  for (let i = members - 1; i >= 0; i--) {
    const qAt = (2 + memberRow[first + i]) * count;
    const row = i * count;
    let sumB = 0;
    let sumQB = 0;
    for (let j = 0; j < count; j++) {
      const qj = values[qAt + j];
      const weighted = weights[j] * before[row + j] * before[after + j];
      sumB += weighted;
      sumQB += weighted * qj;
      before[after + j] *= 1 - qj;
    }
    birnbaumIntegral[memberVariable[first + i]] += sumB;
    qTimesBirnbaumIntegral[memberVariable[first + i]] += sumQB;
  }
}

let ONES = new Float64Array(0);

/** Scratch of the backward sweeps' two sums (sum_j weight_j B_j and sum_j weight_j q_j B_j). */
const SUMS = new Float64Array(2);

/**
 * One node of the backward sweep, "if q then high else low": reach flows to both children; B = reach
 * (P(high) - P(low)) times factor is added to target (see backwardIntegrals). Two times per step.
 */
function sweepNode(values: Float64Array, reach: Float64Array, weights: Float64Array, target: Float64Array, targetAt: number, factor: Float64Array, factorAt: number, at: number, lowAt: number, highAt: number, qAt: number, count: number): Float64Array {
  let sumB = 0;
  let sumQB = 0;
  let sumB1 = 0;
  let sumQB1 = 0;
  const pairs = count & ~1;
  let j = 0;
  for (; j < pairs; j += 2) {
    const r = reach[at + j];
    const r1 = reach[at + j + 1];
    const qj = values[qAt + j];
    const q1 = values[qAt + j + 1];
    reach[highAt + j] += r * qj;
    reach[highAt + j + 1] += r1 * q1;
    reach[lowAt + j] += r * (1 - qj);
    reach[lowAt + j + 1] += r1 * (1 - q1);
    const b = r * (values[highAt + j] - values[lowAt + j]);
    const b1 = r1 * (values[highAt + j + 1] - values[lowAt + j + 1]);
    const weighted = weights[j] * b;
    const weighted1 = weights[j + 1] * b1;
    sumB += weighted;
    sumQB += weighted * qj;
    sumB1 += weighted1;
    sumQB1 += weighted1 * q1;
    target[targetAt + j] += b * factor[factorAt + j];
    target[targetAt + j + 1] += b1 * factor[factorAt + j + 1];
  }
  for (; j < count; j++) {
    const r = reach[at + j];
    const qj = values[qAt + j];
    reach[highAt + j] += r * qj;
    reach[lowAt + j] += r * (1 - qj);
    const b = r * (values[highAt + j] - values[lowAt + j]);
    const weighted = weights[j] * b;
    sumB += weighted;
    sumQB += weighted * qj;
    target[targetAt + j] += b * factor[factorAt + j];
  }
  SUMS[0] = sumB + sumB1;
  SUMS[1] = sumQB + sumQB1;
  return SUMS;
}

/** A node whose high child is TRUE (an OR): no reach to pass to TRUE, and P(high) = 1. */
function sweepOr(values: Float64Array, reach: Float64Array, weights: Float64Array, target: Float64Array, targetAt: number, factor: Float64Array, factorAt: number, at: number, lowAt: number, qAt: number, count: number): Float64Array {
  let sumB = 0;
  let sumQB = 0;
  let sumB1 = 0;
  let sumQB1 = 0;
  const pairs = count & ~1;
  let j = 0;
  for (; j < pairs; j += 2) {
    const r = reach[at + j];
    const r1 = reach[at + j + 1];
    const qj = values[qAt + j];
    const q1 = values[qAt + j + 1];
    reach[lowAt + j] += r * (1 - qj);
    reach[lowAt + j + 1] += r1 * (1 - q1);
    const b = r * (1 - values[lowAt + j]);
    const b1 = r1 * (1 - values[lowAt + j + 1]);
    const weighted = weights[j] * b;
    const weighted1 = weights[j + 1] * b1;
    sumB += weighted;
    sumQB += weighted * qj;
    sumB1 += weighted1;
    sumQB1 += weighted1 * q1;
    target[targetAt + j] += b * factor[factorAt + j];
    target[targetAt + j + 1] += b1 * factor[factorAt + j + 1];
  }
  for (; j < count; j++) {
    const r = reach[at + j];
    const qj = values[qAt + j];
    reach[lowAt + j] += r * (1 - qj);
    const b = r * (1 - values[lowAt + j]);
    const weighted = weights[j] * b;
    sumB += weighted;
    sumQB += weighted * qj;
    target[targetAt + j] += b * factor[factorAt + j];
  }
  SUMS[0] = sumB + sumB1;
  SUMS[1] = sumQB + sumQB1;
  return SUMS;
}

/** A node whose low child is FALSE (an AND): no reach to pass to FALSE, and P(low) = 0. */
function sweepAnd(values: Float64Array, reach: Float64Array, weights: Float64Array, target: Float64Array, targetAt: number, factor: Float64Array, factorAt: number, at: number, highAt: number, qAt: number, count: number): Float64Array {
  let sumB = 0;
  let sumQB = 0;
  let sumB1 = 0;
  let sumQB1 = 0;
  const pairs = count & ~1;
  let j = 0;
  for (; j < pairs; j += 2) {
    const r = reach[at + j];
    const r1 = reach[at + j + 1];
    const qj = values[qAt + j];
    const q1 = values[qAt + j + 1];
    reach[highAt + j] += r * qj;
    reach[highAt + j + 1] += r1 * q1;
    const b = r * values[highAt + j];
    const b1 = r1 * values[highAt + j + 1];
    const weighted = weights[j] * b;
    const weighted1 = weights[j + 1] * b1;
    sumB += weighted;
    sumQB += weighted * qj;
    sumB1 += weighted1;
    sumQB1 += weighted1 * q1;
    target[targetAt + j] += b * factor[factorAt + j];
    target[targetAt + j + 1] += b1 * factor[factorAt + j + 1];
  }
  for (; j < count; j++) {
    const r = reach[at + j];
    const qj = values[qAt + j];
    reach[highAt + j] += r * qj;
    const b = r * values[highAt + j];
    const weighted = weights[j] * b;
    sumB += weighted;
    sumQB += weighted * qj;
    target[targetAt + j] += b * factor[factorAt + j];
  }
  SUMS[0] = sumB + sumB1;
  SUMS[1] = sumQB + sumQB1;
  return SUMS;
}
