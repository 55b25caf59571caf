import type { FaultTreeModel } from '../../shared/model-file.js';
import { Bdd } from './bdd.js';
import type { TreeVariables } from './variables.js';

/**
 * A gate of the structure the diagrams are built from: the model's gates, an OR gate for each event
 * that is a common-cause member (its own part OR the group's shared event), and the helper gates that
 * merge a gate's private inputs. Inputs are structure nodes: below the variable count a model variable,
 * from it on the gate of index node - variableCount.
 */
interface StructureGate {
  readonly type: 'or' | 'and' | 'atLeast';
  readonly k: number;
  inputs: number[];
  readonly gateId: string | undefined;
}

/** A module: a gate whose inputs' variables appear nowhere else in the tree, solved by its own diagram. */
export interface DiagramModule {
  /** The variable the parent diagrams test for this module: variable count + module index. */
  readonly variable: number;
  /** The module's diagram in the shared Bdd; child modules appear in it as single variables. */
  readonly root: number;
  /** The model gate the module is, if it is one (helper modules merge a gate's private inputs). */
  readonly gateId: string | undefined;
}

export interface BuiltTree {
  readonly bdd: Bdd;
  /** The modules, children before parents; the last one is the top event. */
  readonly modules: readonly DiagramModule[];
  /** Variable (a model variable, or variable count + module index) at each diagram position. */
  readonly variableAt: Int32Array;
  /** For each model gate under the top: the module it is, or the module whose diagram holds it. */
  readonly gatePlace: ReadonlyMap<string, { readonly module: number; readonly isModule: boolean }>;
  /** The diagram of the module holding a gate, rebuilt with that gate's output fixed. */
  readonly rootWithGateFixed: (gateId: string, failed: boolean) => number;
}

export interface BuildOptions {
  /** Node budget of the decision diagram. */
  readonly nodeLimit?: number;
  /** Split the tree into modules (default true); false builds one diagram of the whole tree. */
  readonly modular?: boolean;
}

/**
 * The structure of the tree over the model variables, with common-cause members expanded: in an OR gate
 * a member's own part and shared event become two inputs of that gate; elsewhere an OR gate of the two.
 * Returns the gates and the top node (always a gate).
 */
function structureOf(model: FaultTreeModel, variables: TreeVariables): { gates: StructureGate[]; top: number; modelGateNode: Map<string, number> } {
  const variableCount = variables.variables.length;
  const modelGates = new Map(model.gates.map((gate) => [gate.id, gate]));
  const gates: StructureGate[] = [];
  const add = (gate: StructureGate) => {
    gates.push(gate);
    return variableCount + gates.length - 1;
  };
  const eventNodes = new Map<string, number>();
  const eventNode = (id: string): number => {
    const known = eventNodes.get(id);
    if (known !== undefined) return known;
    const own = variables.eventVariable.get(id) as number;
    const shared = variables.sharedVariable.get(id);
    const node = shared === undefined ? own : add({ type: 'or', k: 1, inputs: [own, shared], gateId: undefined });
    eventNodes.set(id, node);
    return node;
  };
  const modelGateNode = new Map<string, number>();
  const gateNode = (id: string): number => {
    const known = modelGateNode.get(id);
    if (known !== undefined) return known;
    const gate = modelGates.get(id);
    if (!gate) return eventNode(id);
    const inputs: number[] = [];
    for (const input of gate.inputs) {
      const shared = modelGates.has(input) ? undefined : variables.sharedVariable.get(input);
      if (gate.type === 'or' && shared !== undefined) inputs.push(variables.eventVariable.get(input) as number, shared);
      else inputs.push(gateNode(input));
    }
    const distinct = gate.type === 'atLeast' ? inputs : [...new Set(inputs)];
    const node = add({ type: gate.type, k: gate.type === 'atLeast' ? (gate.k ?? inputs.length) : gate.type === 'and' ? distinct.length : 1, inputs: distinct, gateId: gate.id });
    modelGateNode.set(id, node);
    return node;
  };
  let top = gateNode(model.top);
  if (top < variableCount) top = add({ type: 'or', k: 1, inputs: [top], gateId: undefined });
  return { gates, top, modelGateNode };
}

/** Number of gate inputs that are each node, over the gates reachable from the top. */
function edgeCounts(gates: StructureGate[], top: number, variableCount: number): Int32Array {
  const counts = new Int32Array(variableCount + gates.length);
  const seen = new Uint8Array(gates.length);
  const stack = [top];
  while (stack.length > 0) {
    const node = stack.pop() as number;
    if (seen[node - variableCount]) continue;
    seen[node - variableCount] = 1;
    for (const input of gates[node - variableCount].inputs) {
      counts[input]++;
      if (input >= variableCount) stack.push(input);
    }
  }
  return counts;
}

/**
 * Gives the private variables of an OR or AND gate (those it is the only gate to use) a helper gate of
 * their own, which is then a module: a channel OR(device, card, relay, shared event) votes as
 * OR(module, shared event), so its voting diagram no longer repeats the private chain at each count.
 */
function mergePrivateInputs(gates: StructureGate[], top: number, variableCount: number): void {
  const counts = edgeCounts(gates, top, variableCount);
  const original = gates.length;
  for (let index = 0; index < original; index++) {
    const gate = gates[index];
    if (gate.type === 'atLeast' || counts[variableCount + index] === 0) continue;
    const own = gate.inputs.filter((input) => input < variableCount && counts[input] === 1);
    if (own.length < 2 || own.length === gate.inputs.length) continue;
    gates.push({ type: gate.type, k: gate.type === 'and' ? own.length : 1, inputs: own, gateId: undefined });
    const ownSet = new Set(own);
    gate.inputs = [...gate.inputs.filter((input) => !ownSet.has(input)), variableCount + gates.length - 1];
  }
}

/**
 * The gates that are modules, by the visit dates of one depth-first traversal (Dutuit & Rauzy, "A
 * linear-time algorithm to find modules of fault trees", IEEE Transactions on Reliability 45(3), 1996;
 * the reference is from memory): a gate is a module when every node below it is first visited after the gate's first visit and last
 * visited before the end of the gate's first traversal. Returns the modules children first (post-order),
 * the top last.
 */
function findModules(gates: StructureGate[], top: number, variableCount: number, modular: boolean): number[] {
  const total = variableCount + gates.length;
  const first = new Int32Array(total).fill(-1);
  const last = new Int32Array(total);
  const finished = new Int32Array(total);
  const postOrder: number[] = [];
  let date = 0;
  const visit = (node: number) => {
    date++;
    if (first[node] === -1) {
      first[node] = date;
      if (node >= variableCount) {
        for (const input of gates[node - variableCount].inputs) visit(input);
        date++;
        finished[node] = date;
        postOrder.push(node);
      }
    }
    last[node] = date;
  };
  visit(top);
  if (!modular) return [top];
  const lowest = new Int32Array(total);
  const highest = new Int32Array(total);
  const modules: number[] = [];
  for (const node of postOrder) {
    let low = Infinity;
    let high = -Infinity;
    for (const input of gates[node - variableCount].inputs) {
      low = Math.min(low, first[input], input >= variableCount ? lowest[input] : Infinity);
      high = Math.max(high, last[input], input >= variableCount ? highest[input] : -Infinity);
    }
    lowest[node] = low;
    highest[node] = high;
    if (node === top || (low > first[node] && high < finished[node])) modules.push(node);
  }
  return modules;
}

/**
 * Builds the top event's diagrams: the tree is split into modules, each solved by its own diagram in
 * which its child modules are single variables. This is exact: a module's variables appear nowhere else,
 * so the module's failure is independent of the rest of the tree and the parent's probability is the
 * parent diagram evaluated with P(module) for that variable (common practice in BDD-based assessment).
 * A diagram's variables are ordered depth-first from the top, events in the order they are first met,
 * and events used under several gates placed before the
 * first gate that uses them (the "depth-first, shared first" heuristic; common practice). Inputs are
 * combined in balance, so their listed order does not change the work.
 */
export function buildTree(model: FaultTreeModel, variables: TreeVariables, options: BuildOptions = {}): BuiltTree {
  const variableCount = variables.variables.length;
  const { gates, top, modelGateNode } = structureOf(model, variables);
  const modular = options.modular ?? true;
  if (modular) mergePrivateInputs(gates, top, variableCount);
  const moduleNodes = findModules(gates, top, variableCount, modular);
  const moduleOf = new Map(moduleNodes.map((node, index) => [node, index]));
  const counts = edgeCounts(gates, top, variableCount);

  const extended = variableCount + moduleNodes.length;
  const rank = new Int32Array(extended).fill(-1);
  const variableAt = new Int32Array(extended);
  let position = 0;
  const place = (variable: number) => {
    if (rank[variable] !== -1) return;
    rank[variable] = position;
    variableAt[position++] = variable;
  };
  // Inputs are visited modules first (they are independent of the rest), then the other gates by the
  // smallest event used by several gates below them (not looking inside modules): the parts of the tree
  // that depend on the same shared event come next to each other, and the diagram repeats as little as
  // possible between the first and the last test of that event. Linear in the tree's size.
  const sharedBelow = new Float64Array(gates.length).fill(NaN);
  const smallestShared = (node: number): number => {
    const index = node - variableCount;
    if (!Number.isNaN(sharedBelow[index])) return sharedBelow[index];
    sharedBelow[index] = Infinity;
    let smallest = Infinity;
    for (const input of gates[index].inputs) {
      if (input < variableCount) {
        if (counts[input] > 1) smallest = Math.min(smallest, input);
      } else if (!moduleOf.has(input)) {
        smallest = Math.min(smallest, smallestShared(input));
      }
    }
    sharedBelow[index] = smallest;
    return smallest;
  };
  const keyOf = (input: number) => (input < variableCount ? -1 : moduleOf.has(input) ? -0.5 : smallestShared(input));
  const ordered = new Uint8Array(gates.length);
  const order = (node: number) => {
    if (ordered[node - variableCount]) return;
    ordered[node - variableCount] = 1;
    const inputs = [...gates[node - variableCount].inputs].sort((a, b) => {
      const [keyA, keyB] = [keyOf(a), keyOf(b)];
      return keyA === keyB ? 0 : keyA < keyB ? -1 : 1;
    });
    for (const input of inputs) if (input < variableCount && counts[input] > 1) place(input);
    for (const input of inputs) {
      if (input < variableCount) {
        place(input);
        continue;
      }
      const module = moduleOf.get(input);
      if (module !== undefined) place(variableCount + module);
      order(input);
    }
  };
  order(top);
  for (let variable = 0; variable < extended; variable++) place(variable);

  const bdd = new Bdd(extended, options.nodeLimit);
  const home = new Map<number, number>();
  const memo = new Map<number, number>();
  const nodeOf = (node: number, module: number, known: Map<number, number>, fixed?: { node: number; value: number }): number => {
    if (node < variableCount) return bdd.variable(rank[node]);
    if (fixed && node === fixed.node) return fixed.value;
    const child = moduleOf.get(node);
    if (child !== undefined && child !== module) return bdd.variable(rank[variableCount + child]);
    const cached = known.get(node);
    if (cached !== undefined) return cached;
    home.set(node, module);
    const gate = gates[node - variableCount];
    const inputs = gate.inputs.map((input) => nodeOf(input, module, known, fixed));
    const result = gate.type === 'and' ? bdd.andAll(inputs) : gate.type === 'or' ? bdd.orAll(inputs) : bdd.atLeast(gate.k, inputs);
    known.set(node, result);
    return result;
  };
  const modules: DiagramModule[] = moduleNodes.map((node, index) => ({
    variable: variableCount + index,
    root: nodeOf(node, index, memo),
    gateId: gates[node - variableCount].gateId,
  }));

  const gatePlace = new Map<string, { module: number; isModule: boolean }>();
  for (const [gateId, node] of modelGateNode) {
    const module = moduleOf.get(node);
    if (module !== undefined) gatePlace.set(gateId, { module, isModule: true });
    else if (home.has(node)) gatePlace.set(gateId, { module: home.get(node) as number, isModule: false });
  }
  const parents = new Map<number, number[]>();
  gates.forEach((gate, index) => {
    for (const input of gate.inputs) parents.set(input, [...(parents.get(input) ?? []), variableCount + index]);
  });
  const rootWithGateFixed = (gateId: string, failed: boolean): number => {
    const node = modelGateNode.get(gateId) as number;
    const module = home.get(node) ?? moduleOf.get(node);
    if (module === undefined) throw new RangeError(`gate "${gateId}" is not under the top event`);
    const above = new Set<number>();
    const stack = [...(parents.get(node) ?? [])];
    while (stack.length > 0) {
      const next = stack.pop() as number;
      if (above.has(next)) continue;
      above.add(next);
      stack.push(...(parents.get(next) ?? []));
    }
    const known = new Map<number, number>();
    for (const [gate, result] of memo) if (gate !== node && !above.has(gate)) known.set(gate, result);
    return nodeOf(moduleNodes[module], module, known, { node, value: failed ? 1 : 0 });
  };
  return { bdd, modules, variableAt, gatePlace, rootWithGateFixed };
}
