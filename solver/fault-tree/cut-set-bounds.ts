import type { FaultTreeModel, Gate } from '../../shared/model-file.js';
import type { TreeVariables } from './variables.js';

/**
 * Minimal cut sets built bottom-up through the gates (the cut-set algebra of MOCUS-type methods, Vesely
 * et al., Fault Tree Handbook NUREG-0492, chapter VII), for trees whose decision diagram is too large.
 * Sets whose probability bound is below a cutoff, or whose order is above a cap, are dropped, and every
 * family carries an upper bound of the probability of what it dropped, so that
 * P(top) <= sum over kept sets of P(set) + dropped holds at every time (union bound; no independence
 * between the dropped part and the rest is assumed).
 */
interface Family {
  readonly sets: Int32Array[];
  /** Product of the members' largest unavailability over the mission, per set. */
  readonly bounds: Float64Array;
  readonly dropped: number;
}

export interface CutSetBoundOptions {
  /** Sets whose probability bound is below this are dropped. Default 1e-15. */
  readonly cutoff?: number;
  /** Sets above this order are dropped. Default 6. */
  readonly maxOrder?: number;
  /** Most sets a gate may hold; beyond, the cutoff is raised tenfold and the build restarts. Default 50,000. */
  readonly maxSets?: number;
}

export interface CutSetBounds {
  readonly sets: Int32Array[];
  /** Upper bound of the probability of the dropped sets (at any time, when values are the largest q). */
  readonly dropped: number;
  /** Whether any set was dropped by the cutoff or the order cap. */
  readonly truncated: boolean;
  readonly cutoff: number;
  readonly maxOrder: number;
}

class TooManySets extends Error {}

function union(a: Int32Array, b: Int32Array): Int32Array {
  const out = new Int32Array(a.length + b.length);
  let i = 0;
  let j = 0;
  let n = 0;
  while (i < a.length || j < b.length) {
    if (j >= b.length || (i < a.length && a[i] < b[j])) out[n++] = a[i++];
    else if (i >= a.length || b[j] < a[i]) out[n++] = b[j++];
    else {
      out[n++] = a[i++];
      j++;
    }
  }
  return out.slice(0, n);
}

function contains(large: Int32Array, small: Int32Array): boolean {
  if (small.length > large.length) return false;
  let i = 0;
  for (let j = 0; j < large.length && i < small.length; j++) if (large[j] === small[i]) i++;
  return i === small.length;
}

/**
 * Removes duplicates and supersets (keeps the minimal sets). Kept sets are indexed by their smallest
 * member, so a candidate is only compared with kept sets whose smallest member it contains.
 */
function minimize(sets: Int32Array[], bounds: number[]): { sets: Int32Array[]; bounds: Float64Array } {
  const order = sets.map((_, index) => index).sort((x, y) => sets[x].length - sets[y].length);
  if (order.length > 0 && sets[order[0]].length === 0) return { sets: [sets[order[0]]], bounds: Float64Array.of(bounds[order[0]]) };
  const kept: Int32Array[] = [];
  const keptBounds: number[] = [];
  const bySmallest = new Map<number, Int32Array[]>();
  for (const index of order) {
    const set = sets[index];
    let subsumed = false;
    for (const member of set) {
      const candidates = bySmallest.get(member);
      if (candidates && candidates.some((other) => contains(set, other))) {
        subsumed = true;
        break;
      }
    }
    if (subsumed) continue;
    kept.push(set);
    keptBounds.push(bounds[index]);
    const list = bySmallest.get(set[0]);
    if (list) list.push(set);
    else bySmallest.set(set[0], [set]);
  }
  return { sets: kept, bounds: Float64Array.from(keptBounds) };
}

function upper(family: Family): number {
  let sum = family.dropped;
  for (const bound of family.bounds) sum += bound;
  return Math.min(1, sum);
}

/**
 * @param values a probability per model variable for the cutoff: the largest q over the mission makes
 *   `dropped` an upper bound at every time; the mean q ranks the sets for listing (then `dropped` is
 *   only indicative).
 */
export function cutSetBounds(model: FaultTreeModel, variables: TreeVariables, values: Float64Array, options: CutSetBoundOptions = {}): CutSetBounds {
  const maxOrder = options.maxOrder ?? 6;
  const maxSets = options.maxSets ?? 50_000;
  let cutoff = options.cutoff ?? 1e-15;
  for (;;) {
    try {
      const top = build(model, variables, values, cutoff, maxOrder, maxSets);
      return { sets: top.sets, dropped: top.dropped, truncated: top.dropped > 0 || cutoff > (options.cutoff ?? 1e-15), cutoff, maxOrder };
    } catch (error) {
      if (!(error instanceof TooManySets) || cutoff >= 1e-3) throw error;
      cutoff *= 10;
    }
  }
}

function build(model: FaultTreeModel, variables: TreeVariables, maxQ: Float64Array, cutoff: number, maxOrder: number, maxSets: number): Family {
  const gates = new Map(model.gates.map((gate) => [gate.id, gate]));
  const memo = new Map<string, Family>();
  const bound = (set: Int32Array) => {
    let product = 1;
    for (const variable of set) product *= maxQ[variable];
    return product;
  };
  const single = (variable: number): Family => ({ sets: [Int32Array.of(variable)], bounds: Float64Array.of(maxQ[variable]), dropped: 0 });
  const or = (families: Family[]): Family => {
    const sets = families.flatMap((family) => family.sets);
    const bounds = families.flatMap((family) => Array.from(family.bounds));
    const minimal = minimize(sets, bounds);
    if (minimal.sets.length > maxSets) throw new TooManySets();
    return { ...minimal, dropped: families.reduce((sum, family) => sum + family.dropped, 0) };
  };
  const and = (a: Family, b: Family): Family => {
    const sets: Int32Array[] = [];
    const bounds: number[] = [];
    let dropped = Math.min(a.dropped, upper(b)) + Math.min(upper(a), b.dropped);
    for (const x of a.sets) {
      for (const y of b.sets) {
        const joined = union(x, y);
        const value = bound(joined);
        if (joined.length > maxOrder || value < cutoff) dropped += value;
        else {
          sets.push(joined);
          bounds.push(value);
        }
      }
      if (sets.length > maxSets * 4) throw new TooManySets();
    }
    const minimal = minimize(sets, bounds);
    if (minimal.sets.length > maxSets) throw new TooManySets();
    return { ...minimal, dropped: Math.min(1, dropped) };
  };
  const atLeast = (k: number, inputs: Family[]): Family => {
    const cache = new Map<string, Family>();
    const vote = (from: number, needed: number): Family => {
      if (needed <= 0) return { sets: [new Int32Array(0)], bounds: Float64Array.of(1), dropped: 0 };
      if (inputs.length - from < needed) return { sets: [], bounds: new Float64Array(0), dropped: 0 };
      const key = `${from},${needed}`;
      const known = cache.get(key);
      if (known) return known;
      const result = or([and(inputs[from], vote(from + 1, needed - 1)), vote(from + 1, needed)]);
      cache.set(key, result);
      return result;
    };
    return vote(0, k);
  };
  const familyOf = (id: string): Family => {
    const known = memo.get(id);
    if (known) return known;
    const gate: Gate | undefined = gates.get(id);
    let family: Family;
    if (!gate) {
      const own = single(variables.eventVariable.get(id) as number);
      const shared = variables.sharedVariable.get(id);
      family = shared === undefined ? own : or([own, single(shared)]);
    } else {
      const inputs = gate.inputs.map(familyOf);
      if (gate.type === 'or') family = or(inputs);
      else if (gate.type === 'and') family = inputs.reduce((left, right) => and(left, right));
      else family = atLeast(gate.k ?? inputs.length, inputs);
    }
    memo.set(id, family);
    return family;
  };
  return familyOf(model.top);
}
