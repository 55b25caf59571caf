import type { FaultTreeModel, Gate } from '../../shared/model-file.js';
import { Bdd } from './bdd.js';
import type { TreeVariables } from './variables.js';

export interface BuiltTree {
  readonly bdd: Bdd;
  readonly root: number;
  /** Position of each model variable in the diagram's order (diagram variable = rank[model variable]). */
  readonly rank: Int32Array;
  /** Model variable at each diagram position. */
  readonly variableAt: Int32Array;
  /** Diagram of every gate (by id), for gate importance. */
  readonly gateNodes: ReadonlyMap<string, number>;
  /** Rebuilds the top with one gate's output fixed, reusing every diagram not above that gate. */
  readonly topWithGateFixed: (gateId: string, failed: boolean) => number;
}

/**
 * Variable order: depth-first from the top, events in the order they are first met, a common-cause
 * group's shared event just before its first member, and events used under several gates placed before
 * the first gate that uses them (the "depth-first, shared first" heuristic; common practice).
 */
export function variableOrder(model: FaultTreeModel, variables: TreeVariables): Int32Array {
  const gates = new Map(model.gates.map((gate) => [gate.id, gate]));
  const parents = new Map<string, number>();
  for (const gate of model.gates) for (const input of gate.inputs) parents.set(input, (parents.get(input) ?? 0) + 1);
  const order: number[] = [];
  const placed = new Uint8Array(variables.variables.length);
  const visitedGates = new Set<string>();
  const place = (eventId: string) => {
    const shared = variables.sharedVariable.get(eventId);
    if (shared !== undefined && !placed[shared]) {
      placed[shared] = 1;
      order.push(shared);
    }
    const own = variables.eventVariable.get(eventId);
    if (own !== undefined && !placed[own]) {
      placed[own] = 1;
      order.push(own);
    }
  };
  const visit = (id: string) => {
    const gate = gates.get(id);
    if (!gate) {
      place(id);
      return;
    }
    if (visitedGates.has(id)) return;
    visitedGates.add(id);
    for (const input of gate.inputs) if (!gates.has(input) && (parents.get(input) ?? 0) > 1) place(input);
    for (const input of gate.inputs) visit(input);
  };
  visit(model.top);
  for (let index = 0; index < placed.length; index++) if (!placed[index]) order.push(index);
  return Int32Array.from(order);
}

/** Builds the top event's diagram bottom-up (each gate once, as a DAG), inputs combined in balance. */
export function buildTree(model: FaultTreeModel, variables: TreeVariables, nodeLimit?: number): BuiltTree {
  const variableAt = variableOrder(model, variables);
  const rank = new Int32Array(variableAt.length);
  variableAt.forEach((variable, position) => {
    rank[variable] = position;
  });
  const bdd = new Bdd(variableAt.length, nodeLimit);
  const gates = new Map(model.gates.map((gate) => [gate.id, gate]));
  const eventNodes = new Map<string, number>();
  const eventNode = (id: string): number => {
    const known = eventNodes.get(id);
    if (known !== undefined) return known;
    const own = bdd.variable(rank[variables.eventVariable.get(id) as number]);
    const shared = variables.sharedVariable.get(id);
    const node = shared === undefined ? own : bdd.or(own, bdd.variable(rank[shared]));
    eventNodes.set(id, node);
    return node;
  };
  const combine = (gate: Gate, inputs: number[]): number => {
    if (gate.type === 'and') return bdd.andAll(inputs);
    if (gate.type === 'or') return bdd.orAll(inputs);
    return bdd.atLeast(gate.k ?? inputs.length, inputs);
  };
  const gateNodes = new Map<string, number>();
  const nodeOf = (id: string, memo: Map<string, number>, fixed?: { gateId: string; node: number }): number => {
    if (fixed && id === fixed.gateId) return fixed.node;
    const gate = gates.get(id);
    if (!gate) return eventNode(id);
    const known = memo.get(id);
    if (known !== undefined) return known;
    const node = combine(
      gate,
      gate.inputs.map((input) => nodeOf(input, memo, fixed)),
    );
    memo.set(id, node);
    return node;
  };
  const root = nodeOf(model.top, gateNodes);

  const ancestors = new Map<string, Set<string>>();
  const parentsOf = new Map<string, string[]>();
  for (const gate of model.gates) for (const input of gate.inputs) parentsOf.set(input, [...(parentsOf.get(input) ?? []), gate.id]);
  const ancestorsOf = (id: string): Set<string> => {
    const known = ancestors.get(id);
    if (known) return known;
    const found = new Set<string>();
    const stack = [...(parentsOf.get(id) ?? [])];
    while (stack.length > 0) {
      const next = stack.pop() as string;
      if (found.has(next)) continue;
      found.add(next);
      stack.push(...(parentsOf.get(next) ?? []));
    }
    ancestors.set(id, found);
    return found;
  };
  const topWithGateFixed = (gateId: string, failed: boolean): number => {
    const above = ancestorsOf(gateId);
    const memo = new Map<string, number>();
    for (const [id, node] of gateNodes) if (!above.has(id) && id !== gateId) memo.set(id, node);
    return nodeOf(model.top, memo, { gateId, node: failed ? 1 : 0 });
  };
  return { bdd, root, rank, variableAt, gateNodes, topWithGateFixed };
}
