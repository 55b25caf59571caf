import type { Bdd } from './bdd.js';
import type { BuiltTree } from './build.js';

/**
 * Minimal cut sets from the decision diagrams, by Rauzy's minimal-solutions algorithm (A. Rauzy, "New
 * algorithms for fault trees analysis", Reliability Engineering & System Safety 40, 1993): for a
 * monotone function f = ite(x, f1, f0), minsol(f) = {x} x without(minsol(f1), minsol(f0)) plus
 * minsol(f0), where without(P, Q) keeps the sets of P that contain no set of Q. The families are held in
 * a zero-suppressed decision diagram (ZBDD: a node reads "sets with x: hi, sets without x: lo"). Each
 * module has its own family, over its variables and its child modules; a set of the top is listed by
 * replacing each module in it with one of the module's sets (the modules' variables are disjoint, so
 * the result is minimal).
 */
const EMPTY = 0;
const BASE = 1;

export interface MinimalCutSetOptions {
  /** Sets whose product of mean unavailabilities is below this are not listed. Default 1e-15. */
  readonly cutoff?: number;
  /** Sets above this order are not listed. Default 6. */
  readonly maxOrder?: number;
  /** Most sets listed; beyond, the cutoff is raised tenfold and the listing restarts. Default 50,000. */
  readonly maxSets?: number;
  /** Most ZBDD nodes; beyond, the listing stops with `complete` false. Default 2,000,000. */
  readonly nodeLimit?: number;
}

export interface MinimalCutSets {
  /** The listed sets, each the increasing model variable indices of its members. */
  readonly sets: Int32Array[];
  /** Whether any minimal cut set was left out by the cutoff or the order cap. */
  readonly truncated: boolean;
  /** The cutoff in force (raised from the asked one when more than maxSets sets passed it). */
  readonly cutoff: number;
  readonly maxOrder: number;
  /** False when the ZBDD outgrew its node budget: then no set is listed. */
  readonly complete: boolean;
}

class ZddNodeLimit extends Error {}
class TooManySets extends Error {}

/** A zero-suppressed decision diagram over the Bdd's variable positions (smaller position nearer the root). */
class Zdd {
  readonly variable: number[] = [Infinity, Infinity];
  readonly low: number[] = [EMPTY, BASE];
  readonly high: number[] = [EMPTY, BASE];
  private readonly unique = new Map<number, Map<number, number>>();
  private readonly withoutMemo = new Map<number, number>();

  constructor(private readonly nodeLimit: number) {}

  node(variable: number, high: number, low: number): number {
    if (high === EMPTY) return low;
    let table = this.unique.get(variable);
    if (!table) {
      table = new Map();
      this.unique.set(variable, table);
    }
    const key = low * 67_108_864 + high;
    const known = table.get(key);
    if (known !== undefined) return known;
    if (this.variable.length >= this.nodeLimit) throw new ZddNodeLimit();
    const created = this.variable.length;
    this.variable.push(variable);
    this.low.push(low);
    this.high.push(high);
    table.set(key, created);
    return created;
  }

  /** The sets of p that contain no set of q (Rauzy 1993, operation "without"). */
  without(p: number, q: number): number {
    if (q === EMPTY || p === EMPTY) return p;
    if (q === BASE || p === q) return EMPTY;
    const key = p * 67_108_864 + q;
    const known = this.withoutMemo.get(key);
    if (known !== undefined) return known;
    const vp = this.variable[p];
    const vq = this.variable[q];
    let result: number;
    if (vp < vq) result = this.node(vp, this.without(this.high[p], q), this.without(this.low[p], q));
    else if (vp > vq) result = this.without(p, this.low[q]);
    else result = this.node(vp, this.without(this.without(this.high[p], this.high[q]), this.low[q]), this.without(this.low[p], this.low[q]));
    this.withoutMemo.set(key, result);
    return result;
  }
}

/** minsol of a monotone diagram (the fault tree is coherent: AND, OR and voting only). */
function minimalSolutions(bdd: Bdd, zdd: Zdd, root: number, memo: Map<number, number>): number {
  if (root === 0) return EMPTY;
  if (root === 1) return BASE;
  const known = memo.get(root);
  if (known !== undefined) return known;
  const low = minimalSolutions(bdd, zdd, bdd.lowOf(root), memo);
  const high = minimalSolutions(bdd, zdd, bdd.highOf(root), memo);
  const result = zdd.node(bdd.variableOf(root), zdd.without(high, low), low);
  memo.set(root, result);
  return result;
}

/**
 * The minimal cut sets of the top event with a product of members' mean unavailabilities at or above
 * the cutoff and at most maxOrder members, listed from the modules' families with branch-and-bound:
 * every ZBDD node knows its family's largest product and smallest order, so a branch that cannot reach
 * the cutoff or keep within the order is not followed (and the result says that sets were left out).
 * @param means each model variable's mean unavailability.
 */
export function minimalCutSets(tree: BuiltTree, variableCount: number, means: Float64Array, options: MinimalCutSetOptions = {}): MinimalCutSets {
  const maxOrder = options.maxOrder ?? 6;
  const maxSets = options.maxSets ?? 50_000;
  const zdd = new Zdd(options.nodeLimit ?? 2_000_000);
  const memo = new Map<number, number>();
  const roots: number[] = [];
  try {
    for (const module of tree.modules) roots.push(minimalSolutions(tree.bdd, zdd, module.root, memo));
  } catch (error) {
    if (!(error instanceof ZddNodeLimit)) throw error;
    return { sets: [], truncated: true, cutoff: options.cutoff ?? 1e-15, maxOrder, complete: false };
  }
  const size = zdd.variable.length;
  const best = new Float64Array(size);
  const fewest = new Float64Array(size);
  best[BASE] = 1;
  fewest[EMPTY] = Infinity;
  // Nodes are created after their children, so one increasing sweep computes both bounds; a child
  // module's family is complete before its parent's is built.
  for (let node = 2; node < size; node++) {
    const variable = tree.variableAt[zdd.variable[node]];
    const factor = variable < variableCount ? means[variable] : best[roots[variable - variableCount]];
    const order = variable < variableCount ? 1 : fewest[roots[variable - variableCount]];
    best[node] = Math.max(best[zdd.low[node]], factor * best[zdd.high[node]]);
    fewest[node] = Math.min(fewest[zdd.low[node]], order + fewest[zdd.high[node]]);
  }

  const list = (cutoff: number): { sets: Int32Array[]; truncated: boolean } => {
    const sets: Int32Array[] = [];
    let truncated = false;
    const chosen: number[] = [];
    const walk = (pending: number[], product: number, order: number): void => {
      let bound = product;
      let least = order;
      for (const node of pending) {
        if (node === EMPTY) return;
        bound *= best[node];
        least += fewest[node];
      }
      if (least > maxOrder || bound < cutoff) {
        truncated = true;
        return;
      }
      if (pending.length === 0) {
        sets.push(Int32Array.from(chosen).sort());
        if (sets.length > maxSets) throw new TooManySets();
        return;
      }
      const node = pending[pending.length - 1];
      const rest = pending.slice(0, -1);
      if (node === BASE) {
        walk(rest, product, order);
        return;
      }
      const variable = tree.variableAt[zdd.variable[node]];
      if (variable < variableCount) {
        chosen.push(variable);
        walk([...rest, zdd.high[node]], product * means[variable], order + 1);
        chosen.pop();
      } else {
        walk([...rest, zdd.high[node], roots[variable - variableCount]], product, order);
      }
      walk([...rest, zdd.low[node]], product, order);
    };
    walk([roots[roots.length - 1]], 1, 0);
    return { sets, truncated };
  };

  let cutoff = options.cutoff ?? 1e-15;
  for (;;) {
    try {
      const { sets, truncated } = list(cutoff);
      return { sets, truncated, cutoff, maxOrder, complete: true };
    } catch (error) {
      if (!(error instanceof TooManySets)) throw error;
      cutoff = Math.max(cutoff * 10, 1e-300);
    }
  }
}
