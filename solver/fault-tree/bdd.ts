/**
 * A reduced ordered binary decision diagram (Bryant 1986, "Graph-based algorithms for Boolean function
 * manipulation") over variables 0..n-1, variable 0 nearest the root. Nodes live in growable typed arrays;
 * node 0 is FALSE and node 1 is TRUE; every other node reads "if variable then high else low". Children
 * always have smaller node numbers than their parents, so increasing node numbers are a topological order.
 *
 * Only the operations a coherent fault tree needs are offered: AND, OR and the k-out-of-n vote, built
 * from balanced combinations so that the order of a gate's inputs does not change the work.
 */
export const FALSE_NODE = 0;
export const TRUE_NODE = 1;

/** Thrown when a diagram outgrows its node budget; the caller decides how to fall back. */
export class BddNodeLimitError extends Error {
  constructor(readonly limit: number) {
    super(`the decision diagram needs more than ${limit} nodes`);
    this.name = 'BddNodeLimitError';
  }
}

const OP_AND = 0;
const OP_OR = 1;

export class Bdd {
  private variables: Int32Array;
  private lows: Int32Array;
  private highs: Int32Array;
  private count = 2;
  private uniqueTable: Int32Array;
  private uniqueMask: number;
  private readonly computed = [new Map<number, number>(), new Map<number, number>()];

  /**
   * @param variableCount number of variables; variable i is tested before variable i + 1.
   * @param nodeLimit the diagram throws BddNodeLimitError beyond this many nodes (default 4,000,000).
   */
  constructor(
    readonly variableCount: number,
    readonly nodeLimit = 4_000_000,
  ) {
    const capacity = 1024;
    this.variables = new Int32Array(capacity);
    this.lows = new Int32Array(capacity);
    this.highs = new Int32Array(capacity);
    this.variables[0] = variableCount;
    this.variables[1] = variableCount;
    this.uniqueTable = new Int32Array(2048).fill(-1);
    this.uniqueMask = 2047;
  }

  get size(): number {
    return this.count;
  }

  variableOf(node: number): number {
    return this.variables[node];
  }

  lowOf(node: number): number {
    return this.lows[node];
  }

  highOf(node: number): number {
    return this.highs[node];
  }

  /** The diagram of a single variable. */
  variable(index: number): number {
    if (index < 0 || index >= this.variableCount) throw new RangeError(`variable ${index} out of range`);
    return this.makeNode(index, FALSE_NODE, TRUE_NODE);
  }

  and(a: number, b: number): number {
    return this.apply(OP_AND, a, b);
  }

  or(a: number, b: number): number {
    return this.apply(OP_OR, a, b);
  }

  /** AND of many diagrams, combined as a balanced binary tree. */
  andAll(nodes: readonly number[]): number {
    return this.balanced(OP_AND, nodes, TRUE_NODE);
  }

  /** OR of many diagrams, combined as a balanced binary tree. */
  orAll(nodes: readonly number[]): number {
    return this.balanced(OP_OR, nodes, FALSE_NODE);
  }

  /**
   * "At least k of these are true". Inputs are sorted by their top variable, then split in halves:
   * atLeast(k, A ∪ B) = OR over j of atLeast(j, A) AND atLeast(k - j, B), which keeps the work
   * independent of the order the inputs are listed in.
   */
  atLeast(k: number, nodes: readonly number[]): number {
    const sorted = [...nodes].sort((a, b) => this.variables[a] - this.variables[b]);
    const memo = new Map<string, number>();
    const vote = (from: number, to: number, needed: number): number => {
      const length = to - from;
      if (needed <= 0) return TRUE_NODE;
      if (needed > length) return FALSE_NODE;
      if (length === 1) return sorted[from];
      if (needed === 1) return this.balanced(OP_OR, sorted.slice(from, to), FALSE_NODE);
      if (needed === length) return this.balanced(OP_AND, sorted.slice(from, to), TRUE_NODE);
      const key = `${from},${to},${needed}`;
      const known = memo.get(key);
      if (known !== undefined) return known;
      const middle = from + (length >> 1);
      const terms: number[] = [];
      for (let left = Math.max(0, needed - (to - middle)); left <= Math.min(needed, middle - from); left++) {
        terms.push(this.and(vote(from, middle, left), vote(middle, to, needed - left)));
      }
      const result = this.balanced(OP_OR, terms, FALSE_NODE);
      memo.set(key, result);
      return result;
    };
    return vote(0, sorted.length, k);
  }

  /** The nodes reachable from a root, terminals first, in increasing (topological) order. */
  reachable(root: number): Int32Array {
    const seen = new Uint8Array(this.count);
    seen[0] = 1;
    seen[1] = 1;
    const stack = [root];
    while (stack.length > 0) {
      const node = stack.pop() as number;
      if (seen[node]) continue;
      seen[node] = 1;
      stack.push(this.lows[node], this.highs[node]);
    }
    let total = 0;
    for (let node = 0; node < this.count; node++) total += seen[node];
    const order = new Int32Array(total);
    let next = 0;
    for (let node = 0; node < this.count; node++) if (seen[node]) order[next++] = node;
    return order;
  }

  /** Drops the operation caches (the nodes stay); call between independent builds to bound memory. */
  clearCaches(): void {
    for (const cache of this.computed) cache.clear();
  }

  private balanced(op: number, nodes: readonly number[], identity: number): number {
    if (nodes.length === 0) return identity;
    let layer = [...nodes];
    while (layer.length > 1) {
      const next: number[] = [];
      for (let index = 0; index + 1 < layer.length; index += 2) next.push(this.apply(op, layer[index], layer[index + 1]));
      if (layer.length % 2 === 1) next.push(layer[layer.length - 1]);
      layer = next;
    }
    return layer[0];
  }

  private apply(op: number, a: number, b: number): number {
    if (op === OP_AND) {
      if (a === FALSE_NODE || b === FALSE_NODE) return FALSE_NODE;
      if (a === TRUE_NODE) return b;
      if (b === TRUE_NODE || a === b) return a;
    } else {
      if (a === TRUE_NODE || b === TRUE_NODE) return TRUE_NODE;
      if (a === FALSE_NODE) return b;
      if (b === FALSE_NODE || a === b) return a;
    }
    if (a > b) {
      const swap = a;
      a = b;
      b = swap;
    }
    const cache = this.computed[op];
    const key = a * 67_108_864 + b;
    const known = cache.get(key);
    if (known !== undefined) return known;
    const va = this.variables[a];
    const vb = this.variables[b];
    let result: number;
    if (va === vb) {
      result = this.makeNode(va, this.apply(op, this.lows[a], this.lows[b]), this.apply(op, this.highs[a], this.highs[b]));
    } else if (va < vb) {
      result = this.makeNode(va, this.apply(op, this.lows[a], b), this.apply(op, this.highs[a], b));
    } else {
      result = this.makeNode(vb, this.apply(op, a, this.lows[b]), this.apply(op, a, this.highs[b]));
    }
    cache.set(key, result);
    return result;
  }

  private makeNode(variable: number, low: number, high: number): number {
    if (low === high) return low;
    let slot = this.hash(variable, low, high) & this.uniqueMask;
    for (;;) {
      const found = this.uniqueTable[slot];
      if (found === -1) break;
      if (this.variables[found] === variable && this.lows[found] === low && this.highs[found] === high) return found;
      slot = (slot + 1) & this.uniqueMask;
    }
    if (this.count >= this.nodeLimit) throw new BddNodeLimitError(this.nodeLimit);
    if (this.count === this.variables.length) this.grow();
    const node = this.count++;
    this.variables[node] = variable;
    this.lows[node] = low;
    this.highs[node] = high;
    this.uniqueTable[slot] = node;
    if (this.count * 2 > this.uniqueTable.length) this.rehash();
    return node;
  }

  private hash(variable: number, low: number, high: number): number {
    let h = Math.imul(variable, 0x9e3779b1) ^ Math.imul(low, 0x85ebca77) ^ Math.imul(high, 0xc2b2ae3d);
    h ^= h >>> 15;
    h = Math.imul(h, 0x27d4eb2f);
    return (h ^ (h >>> 13)) >>> 0;
  }

  private grow(): void {
    const capacity = this.variables.length * 2;
    for (const key of ['variables', 'lows', 'highs'] as const) {
      const bigger = new Int32Array(capacity);
      bigger.set(this[key]);
      this[key] = bigger;
    }
  }

  private rehash(): void {
    const size = this.uniqueTable.length * 2;
    this.uniqueTable = new Int32Array(size).fill(-1);
    this.uniqueMask = size - 1;
    for (let node = 2; node < this.count; node++) {
      let slot = this.hash(this.variables[node], this.lows[node], this.highs[node]) & this.uniqueMask;
      while (this.uniqueTable[slot] !== -1) slot = (slot + 1) & this.uniqueMask;
      this.uniqueTable[slot] = node;
    }
  }
}
