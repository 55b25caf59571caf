import { evaluateEventTimeline } from '../events/event-timeline.js';
import type { Bdd } from './bdd.js';
import type { EventTimeline } from '../events/event-timeline.js';

/**
 * A diagram flattened for evaluation: nodes renumbered 0..size-1 in topological order (0 = FALSE,
 * 1 = TRUE), each with the model variable it tests, that variable's row of the q matrix, and its two
 * children.
 */
export interface FlatDiagram {
  readonly size: number;
  readonly variable: Int32Array;
  readonly row: Int32Array;
  readonly low: Int32Array;
  readonly high: Int32Array;
  readonly root: number;
}

export function flatten(bdd: Bdd, root: number, variableAt: Int32Array, rowOf: Int32Array): FlatDiagram {
  const nodes = bdd.reachable(root);
  const local = new Map<number, number>();
  nodes.forEach((node, index) => local.set(node, index));
  const variable = new Int32Array(nodes.length).fill(-1);
  const row = new Int32Array(nodes.length).fill(-1);
  const low = new Int32Array(nodes.length);
  const high = new Int32Array(nodes.length);
  for (let index = 2; index < nodes.length; index++) {
    const node = nodes[index];
    variable[index] = variableAt[bdd.variableOf(node)];
    row[index] = rowOf[variable[index]];
    low[index] = local.get(bdd.lowOf(node)) as number;
    high[index] = local.get(bdd.highOf(node)) as number;
  }
  return { size: nodes.length, variable, row, low, high, root: local.get(root) as number };
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

/**
 * P(top) at each time of the batch: one bottom-up pass, P(node) = P(low) + q (P(high) - P(low)),
 * exact under independence (Rauzy 1993, "New algorithms for fault trees analysis").
 * @param values scratch of size * count doubles, left holding every node's probability.
 */
export function forwardPass(diagram: FlatDiagram, q: Float64Array, count: number, values: Float64Array): Float64Array {
  values.fill(0, 0, count);
  values.fill(1, count, 2 * count);
  const { row, low, high } = diagram;
  for (let node = 2; node < diagram.size; node++) {
    const out = node * count;
    const lowAt = low[node] * count;
    const highAt = high[node] * count;
    const qAt = row[node] * count;
    for (let j = 0; j < count; j++) {
      const p0 = values[lowAt + j];
      values[out + j] = p0 + q[qAt + j] * (values[highAt + j] - p0);
    }
  }
  return values.subarray(diagram.root * count, diagram.root * count + count);
}

/**
 * Birnbaum importance dP(top)/dq_v of every variable at every time of the batch, from one top-down pass
 * over the forward values: each node passes its reach probability to its children, and a node testing v
 * adds reach * (P(high) - P(low)) to v (Rauzy 1993; the backward pass of Dutuit & Rauzy 2001).
 * @param reach scratch of size * count doubles.
 * @param birnbaum out, one row of count per model variable, overwritten.
 */
export function backwardPass(
  diagram: FlatDiagram,
  q: Float64Array,
  count: number,
  values: Float64Array,
  reach: Float64Array,
  birnbaum: Float64Array,
): void {
  const { variable, row, low, high } = diagram;
  reach.fill(0, 0, diagram.size * count);
  birnbaum.fill(0);
  reach.fill(1, diagram.root * count, diagram.root * count + count);
  for (let node = diagram.size - 1; node >= 2; node--) {
    const at = node * count;
    const lowAt = low[node] * count;
    const highAt = high[node] * count;
    const qAt = row[node] * count;
    const bAt = variable[node] * count;
    for (let j = 0; j < count; j++) {
      const r = reach[at + j];
      if (r === 0) continue;
      const qj = q[qAt + j];
      reach[highAt + j] += r * qj;
      reach[lowAt + j] += r * (1 - qj);
      birnbaum[bAt + j] += r * (values[highAt + j] - values[lowAt + j]);
    }
  }
}

/**
 * The backward pass of backwardPass() with its results integrated on the fly over a batch of quadrature
 * times: adds sum_j weight_j B_v(t_j) and sum_j weight_j q_v(t_j) B_v(t_j) to each variable's integrals,
 * and B_v(t_j) w_v(t_j) to the top's failure frequency at t_j (Rausand & Hoyland, System Reliability
 * Theory, 2nd ed., chapter on system reliability, from memory). Every term is non-negative for a coherent
 * tree, so summing per node instead of per variable changes the totals by rounding only.
 * @param reach scratch of size * count doubles.
 * @param frequency out, count doubles, added to.
 */
export function backwardIntegrals(
  diagram: FlatDiagram,
  q: Float64Array,
  w: Float64Array,
  count: number,
  values: Float64Array,
  reach: Float64Array,
  weights: Float64Array,
  birnbaumIntegral: Float64Array,
  qTimesBirnbaumIntegral: Float64Array,
  frequency: Float64Array,
): void {
  const { variable, row, low, high } = diagram;
  reach.fill(0, 0, diagram.size * count);
  reach.fill(1, diagram.root * count, diagram.root * count + count);
  for (let node = diagram.size - 1; node >= 2; node--) {
    const at = node * count;
    const lowAt = low[node] * count;
    const highAt = high[node] * count;
    const qAt = row[node] * count;
    let sumB = 0;
    let sumQB = 0;
    for (let j = 0; j < count; j++) {
      const r = reach[at + j];
      if (r === 0) continue;
      const qj = q[qAt + j];
      reach[highAt + j] += r * qj;
      reach[lowAt + j] += r * (1 - qj);
      const b = r * (values[highAt + j] - values[lowAt + j]);
      const weighted = weights[j] * b;
      sumB += weighted;
      sumQB += weighted * qj;
      frequency[j] += b * w[qAt + j];
    }
    birnbaumIntegral[variable[node]] += sumB;
    qTimesBirnbaumIntegral[variable[node]] += sumQB;
  }
}
