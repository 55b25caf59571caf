import type { FlatDiagram } from './evaluate.js';

export interface MinimalCutSets {
  /** Each set: model variable indices, increasing. */
  readonly sets: Int32Array[];
  /** True when sets above maxOrder were left out (all sets up to maxOrder are listed). */
  readonly truncated: boolean;
}

export interface CutSetOptions {
  /** Largest order listed. Default 6. */
  readonly maxOrder?: number;
  /** Most sets kept at any node before giving up on that order (then the order cap is lowered). Default 200,000. */
  readonly maxSets?: number;
}

function isSubset(small: Int32Array, large: Int32Array): boolean {
  if (small.length > large.length) return false;
  let i = 0;
  for (let j = 0; j < large.length && i < small.length; j++) {
    if (large[j] === small[i]) i++;
    else if (large[j] > small[i]) return false;
  }
  return i === small.length;
}

class TooManySets extends Error {}

/**
 * Minimal cut sets of a coherent function from its diagram (Rauzy 1993, "New algorithms for fault trees
 * analysis", Reliability Engineering & System Safety 40): for a node x ? f1 : f0,
 * MCS = MCS(f0) ∪ { {x} ∪ m : m in MCS(f1), m contains no set of MCS(f0) }.
 * Dropping sets above an order cap keeps every listed set exact and minimal, since a set of order <= c
 * can only contain sets of order <= c.
 */
export function minimalCutSets(diagram: FlatDiagram, options: CutSetOptions = {}): MinimalCutSets {
  const maxSets = options.maxSets ?? 200_000;
  let maxOrder = options.maxOrder ?? 6;
  let truncated = false;
  for (;;) {
    try {
      const sets = enumerate(diagram, maxOrder, maxSets, (dropped) => {
        if (dropped) truncated = true;
      });
      return { sets, truncated };
    } catch (error) {
      if (!(error instanceof TooManySets) || maxOrder <= 1) throw error;
      maxOrder -= 1;
      truncated = true;
    }
  }
}

function enumerate(diagram: FlatDiagram, maxOrder: number, maxSets: number, noteDropped: (dropped: boolean) => void): Int32Array[] {
  const memo: (Int32Array[] | undefined)[] = new Array(diagram.size);
  memo[0] = [];
  memo[1] = [new Int32Array(0)];
  for (let node = 2; node < diagram.size; node++) {
    const lowSets = memo[diagram.low[node]] as Int32Array[];
    const highSets = memo[diagram.high[node]] as Int32Array[];
    const variable = diagram.variable[node];
    const result = [...lowSets];
    for (const set of highSets) {
      if (set.length + 1 > maxOrder) {
        noteDropped(true);
        continue;
      }
      if (lowSets.some((other) => isSubset(other, set))) continue;
      const extended = new Int32Array(set.length + 1);
      let written = 0;
      let inserted = false;
      for (const member of set) {
        if (!inserted && variable < member) {
          extended[written++] = variable;
          inserted = true;
        }
        extended[written++] = member;
      }
      if (!inserted) extended[written] = variable;
      result.push(extended);
    }
    if (result.length > maxSets) throw new TooManySets();
    memo[node] = result;
  }
  return memo[diagram.root] as Int32Array[];
}
