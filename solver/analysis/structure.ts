import { isProbabilityEvent, type CommonCauseGroup, type FaultTreeModel, type Gate, type RateEvent } from '../../shared/model-file.js';

/**
 * A subsystem of a fault tree: each input of the top OR gate (sensors, logic solver, final elements in
 * series), or the top itself when it is not an OR gate. This is how the results read a fault tree's
 * architecture (common practice: a SIF is a series of subsystems, IEC 61508-6:2010 B.3.2.1).
 */
export interface Subsystem {
  readonly id: string;
  readonly label: string;
  /** The item in the tree: a gate, or a single basic event. */
  readonly gate: Gate | undefined;
  /** MooN when the subsystem is one gate whose inputs are all basic events; undefined otherwise. */
  readonly voting: string | undefined;
  /** Smallest number of item failures that fail the subsystem, less one (IEC 61508-2:2010 7.4.4.1.1). */
  readonly hft: number;
  /** The rate events below the subsystem, each once. */
  readonly events: readonly RateEvent[];
  /** Ids of the probability events below it (no rates, left out of SFF and spurious trips). */
  readonly probabilityEvents: readonly string[];
  /** The common-cause groups with a member below it. */
  readonly ccf: readonly CommonCauseGroup[];
}

/** Number of its inputs that must fail for a gate to fail: 1 for OR, all for AND, k for atLeast. */
export function failuresToFail(gate: Gate): number {
  if (gate.type === 'or') return 1;
  if (gate.type === 'and') return gate.inputs.length;
  return gate.k ?? 1;
}

/** M of MooN (channels needed to act) for a gate of n inputs that fails at k failures: M = n - k + 1. */
export function votingOf(gate: Gate): string {
  const n = gate.inputs.length;
  return `${n - failuresToFail(gate) + 1}oo${n}`;
}

/**
 * The order of the smallest minimal cut set below an item, from the structure alone (common cause left
 * out: HFT counts independent faults). OR takes the smallest input, AND the sum, atLeast k the sum of
 * the k smallest.
 */
export function smallestCutOrder(model: FaultTreeModel, id: string, memo = new Map<string, number>()): number {
  const known = memo.get(id);
  if (known !== undefined) return known;
  const gate = model.gates.find((candidate) => candidate.id === id);
  let order = 1;
  if (gate) {
    const orders = gate.inputs.map((input) => smallestCutOrder(model, input, memo)).sort((a, b) => a - b);
    order = orders.slice(0, failuresToFail(gate)).reduce((sum, value) => sum + value, 0);
  }
  memo.set(id, order);
  return order;
}

function eventsBelow(model: FaultTreeModel, id: string, seen: Set<string>, out: string[]): void {
  if (seen.has(id)) return;
  seen.add(id);
  const gate = model.gates.find((candidate) => candidate.id === id);
  if (!gate) {
    out.push(id);
    return;
  }
  for (const input of gate.inputs) eventsBelow(model, input, seen, out);
}

/** The basic event ids below an item, in tree order, each once. */
export function basicEventsBelow(model: FaultTreeModel, id: string): string[] {
  const out: string[] = [];
  eventsBelow(model, id, new Set(), out);
  return out;
}

/** The subsystems of a fault tree (see Subsystem). */
export function subsystemsOf(model: FaultTreeModel): Subsystem[] {
  const top = model.gates.find((gate) => gate.id === model.top);
  const ids = top && top.type === 'or' ? top.inputs : [model.top];
  const memo = new Map<string, number>();
  return ids.map((id) => {
    const gate = model.gates.find((candidate) => candidate.id === id);
    const below = basicEventsBelow(model, id);
    const events: RateEvent[] = [];
    const probabilityEvents: string[] = [];
    for (const eventId of below) {
      const event = model.events.find((candidate) => candidate.id === eventId);
      if (!event) continue;
      if (isProbabilityEvent(event)) probabilityEvents.push(event.id);
      else events.push(event);
    }
    const allEvents = gate !== undefined && gate.inputs.every((input) => !model.gates.some((candidate) => candidate.id === input));
    const item = gate ?? model.events.find((candidate) => candidate.id === id);
    return {
      id,
      label: item?.label ?? id,
      gate,
      voting: gate && allEvents ? votingOf(gate) : gate ? undefined : '1oo1',
      hft: smallestCutOrder(model, id, memo) - 1,
      events,
      probabilityEvents,
      ccf: (model.ccf ?? []).filter((group) => group.members.some((member) => below.includes(member))),
    };
  });
}
