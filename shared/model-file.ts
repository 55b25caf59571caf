import { z } from 'zod';

/**
 * The Proofline model file ("proofline/model", version 1): one JSON document per model, fault tree or
 * state (Markov) model. Times are in hours and rates per hour. docs/model-format.md describes every field
 * and its semantics; this schema is the single definition used by the client, the server and the solver.
 */

const MODEL_ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.\-]{0,63}$/;

export const modelItemId = z
  .string()
  .regex(MODEL_ID_PATTERN, 'an id is 1-64 letters, digits, "_", "." or "-", starting with a letter or digit');

const hours = z.number().finite().nonnegative();
const positiveHours = z.number().finite().positive();
const rate = z.number().finite().nonnegative();
const fraction = z.number().finite().min(0).max(1);

export const demandMode = z.enum(['low', 'high', 'continuous']);
export type DemandMode = z.infer<typeof demandMode>;

export const mission = z.strictObject({
  hours: positiveHours,
  demand: demandMode,
});

export const proofTest = z.strictObject({
  intervalHours: positiveHours,
  firstHours: positiveHours.optional(),
  coverage: fraction.optional(),
  durationHours: hours.optional(),
  downDuringTest: z.boolean().optional(),
});
export type ProofTest = z.infer<typeof proofTest>;

export const partialTest = z.strictObject({
  intervalHours: positiveHours,
  firstHours: positiveHours.optional(),
  coverage: fraction,
});
export type PartialTest = z.infer<typeof partialTest>;

/** Fields of a rate event that a device-library link fills in (see deviceLink). */
export const LINKED_EVENT_FIELDS = ['lambdaDU', 'lambdaDD', 'lambdaS', 'deviceType', 'systematicCapability', 'proofTest.coverage'] as const;
export type LinkedEventField = (typeof LINKED_EVENT_FIELDS)[number];

/**
 * A link from a rate event to one version of a device-library record (shared/api/devices.ts): the linked
 * fields hold that version's values (lambdaS = lambdaSU + lambdaSD), except those listed in `overrides`,
 * each changed on purpose and with its reason. A newer library version changes nothing until the link is
 * updated, so a model keeps the figures it used.
 */
export const deviceLink = z
  .strictObject({
    id: z.uuid({ message: 'must be the id (UUID) of a device-library record' }),
    version: z.number().int().min(1),
    overrides: z
      .array(
        z.strictObject({
          field: z.enum(LINKED_EVENT_FIELDS),
          reason: z.string().trim().min(1, 'an override needs a reason').max(500),
        }),
      )
      .optional(),
  })
  .refine((link) => new Set((link.overrides ?? []).map((item) => item.field)).size === (link.overrides ?? []).length, {
    message: 'a field is overridden twice',
    path: ['overrides'],
  });
export type DeviceLink = z.infer<typeof deviceLink>;

export const rateEvent = z.strictObject({
  id: modelItemId,
  label: z.string().max(200).optional(),
  lambdaDU: rate,
  lambdaDD: rate.optional(),
  lambdaS: rate.optional(),
  mttrHours: hours.optional(),
  proofTest: proofTest.optional(),
  partialTest: partialTest.optional(),
  /**
   * Device type for the architectural constraints, IEC 61508-2:2010 7.4.4.1.2 (A: simple, failure modes
   * well known) and 7.4.4.1.3 (B: complex). Optional; the results take B when it is not given.
   */
  deviceType: z.enum(['A', 'B']).optional(),
  /** Systematic capability of the device, SC 1 to 4 (IEC 61508-2:2010 7.6.2.7). Optional. */
  systematicCapability: z.number().int().min(1).max(4).optional(),
  /** Error factor of the failure rates (95th over 50th percentile of a lognormal), for the uncertainty analysis. */
  errorFactor: z.number().finite().min(1).max(100).optional(),
  /** Where the figures come from (data handbook, certificate, field data), printed in the verification report. */
  source: z.string().max(500).optional(),
  /** The device-library version the figures come from, if linked. */
  device: deviceLink.optional(),
});

export const probabilityEvent = z.strictObject({
  id: modelItemId,
  label: z.string().max(200).optional(),
  probability: fraction,
  /** Where the probability comes from, printed in the verification report. */
  source: z.string().max(500).optional(),
});

/** A basic event: failure rates with a test plan, or a constant probability on demand. */
export const basicEvent = z.union([rateEvent, probabilityEvent]);
export type RateEvent = z.infer<typeof rateEvent>;
export type ProbabilityEvent = z.infer<typeof probabilityEvent>;
export type BasicEvent = z.infer<typeof basicEvent>;

export function isProbabilityEvent(event: BasicEvent): event is ProbabilityEvent {
  return 'probability' in event;
}

export const gateType = z.enum(['or', 'and', 'atLeast']);
export type GateType = z.infer<typeof gateType>;

export const gate = z.strictObject({
  id: modelItemId,
  label: z.string().max(200).optional(),
  type: gateType,
  /** For `atLeast`: the gate fails when at least k of its inputs have failed. */
  k: z.number().int().positive().optional(),
  inputs: z.array(modelItemId).min(1),
});
export type Gate = z.infer<typeof gate>;

export const commonCauseGroup = z.strictObject({
  id: modelItemId,
  label: z.string().max(200).optional(),
  members: z.array(modelItemId).min(2),
  beta: fraction,
  betaD: fraction.optional(),
  model: z.enum(['beta', 'pds']),
  /** PDS method only: C_MooN given explicitly instead of taken from the table. */
  factor: z.number().finite().nonnegative().optional(),
  /** Where the beta factor comes from (e.g. an IEC 61508-6 Annex D scoring), printed in the verification report. */
  source: z.string().max(500).optional(),
});
export type CommonCauseGroup = z.infer<typeof commonCauseGroup>;

export const layout = z.record(z.string(), z.strictObject({ x: z.number().finite(), y: z.number().finite() }));

const header = {
  format: z.literal('proofline/model'),
  version: z.literal(1),
  name: z.string().trim().min(1).max(200),
  description: z.string().max(5000).optional(),
  mission,
  layout: layout.optional(),
};

export const faultTreeModelShape = z.strictObject({
  ...header,
  kind: z.literal('fault-tree'),
  events: z.array(basicEvent).min(1),
  gates: z.array(gate),
  ccf: z.array(commonCauseGroup).optional(),
  top: modelItemId,
});

export const markovState = z.strictObject({
  id: modelItemId,
  label: z.string().max(200).optional(),
  /** Initial probability; the initial values of all states must sum to 1. */
  initial: fraction.optional(),
  /** The function cannot act on a demand in this state: PFD(t) is the probability of such states. */
  down: z.boolean().optional(),
});
export type MarkovState = z.infer<typeof markovState>;

export const markovTransition = z.strictObject({
  from: modelItemId,
  to: modelItemId,
  rate: rate,
  label: z.string().max(200).optional(),
  /**
   * A detected (revealed) failure: it moves probability like any transition, but PFH, the frequency of
   * dangerous undetected failures of the function, leaves it out (the convention of IEC 61508-6 B.3.3,
   * where a detected failure leads to the safe state or to repair). Default false.
   */
  detected: z.boolean().optional(),
});
export type MarkovTransition = z.infer<typeof markovTransition>;

export const testMove = z.strictObject({
  from: modelItemId,
  to: modelItemId,
  probability: fraction,
});

export const markovTest = z.strictObject({
  label: z.string().max(200).optional(),
  intervalHours: positiveHours,
  firstHours: positiveHours.optional(),
  moves: z.array(testMove).min(1),
});
export type MarkovTest = z.infer<typeof markovTest>;

/**
 * An independent part of a state model: its own states, transitions and tests, sharing nothing with the
 * main chain or the other parts. The function is down when the main chain or any part is down (a series),
 * so the solver can solve each part on its own and combine them exactly instead of one product chain.
 * State ids are local to their part.
 */
export const markovPart = z.strictObject({
  id: modelItemId,
  label: z.string().max(200).optional(),
  states: z.array(markovState).min(1),
  transitions: z.array(markovTransition),
  tests: z.array(markovTest).optional(),
});
export type MarkovPart = z.infer<typeof markovPart>;

export const markovModelShape = z.strictObject({
  ...header,
  kind: z.literal('markov'),
  states: z.array(markovState).min(1),
  transitions: z.array(markovTransition),
  tests: z.array(markovTest).optional(),
  /** Further independent parts in series with the main chain (see markovPart). */
  parts: z.array(markovPart).optional(),
});

type Issue = { path: (string | number)[]; message: string };

function duplicateIds(ids: { id: string }[], listName: string): Issue[] {
  const seen = new Map<string, number>();
  const issues: Issue[] = [];
  ids.forEach((item, index) => {
    const first = seen.get(item.id);
    if (first !== undefined) {
      issues.push({ path: [listName, index, 'id'], message: `duplicate id "${item.id}" (also ${listName}[${first}])` });
    } else {
      seen.set(item.id, index);
    }
  });
  return issues;
}

/** Most events plus gates a fault tree may have (larger models are refused with an error). */
export const MAX_FAULT_TREE_ITEMS = 20_000;

/** Reference checks of a fault tree: unknown ids, k out of range, cycles, CCF members, tests vs mission. */
export function faultTreeIssues(model: z.infer<typeof faultTreeModelShape>): Issue[] {
  const issues: Issue[] = [...duplicateIds(model.events, 'events'), ...duplicateIds(model.gates, 'gates')];
  const itemCount = model.events.length + model.gates.length;
  if (itemCount > MAX_FAULT_TREE_ITEMS) {
    issues.push({ path: [], message: `the model has ${itemCount} events and gates; at most ${MAX_FAULT_TREE_ITEMS} are allowed` });
    return issues;
  }
  const eventIds = new Set(model.events.map((event) => event.id));
  const gateIds = new Set(model.gates.map((item) => item.id));
  model.gates.forEach((item, index) => {
    if (eventIds.has(item.id)) issues.push({ path: ['gates', index, 'id'], message: `"${item.id}" is both an event and a gate` });
    item.inputs.forEach((input, inputIndex) => {
      if (!eventIds.has(input) && !gateIds.has(input)) {
        issues.push({ path: ['gates', index, 'inputs', inputIndex], message: `gate "${item.id}" has unknown input "${input}"` });
      }
    });
    if (new Set(item.inputs).size !== item.inputs.length) {
      issues.push({ path: ['gates', index, 'inputs'], message: `gate "${item.id}" lists an input twice` });
    }
    if (item.type === 'atLeast') {
      if (item.k === undefined) {
        issues.push({ path: ['gates', index, 'k'], message: `voting gate "${item.id}" needs k (fails when at least k inputs fail)` });
      } else if (item.k > item.inputs.length) {
        issues.push({ path: ['gates', index, 'k'], message: `voting gate "${item.id}" has k = ${item.k} but only ${item.inputs.length} inputs` });
      }
    } else if (item.k !== undefined) {
      issues.push({ path: ['gates', index, 'k'], message: `k is only allowed on "atLeast" gates ("${item.id}" is "${item.type}")` });
    }
  });
  if (!gateIds.has(model.top) && !eventIds.has(model.top)) {
    issues.push({ path: ['top'], message: `top "${model.top}" is not a gate or event of this model` });
  }
  const cycle = findGateCycle(model.gates);
  if (cycle) issues.push({ path: ['gates'], message: `the gates form a cycle: ${cycle.join(' -> ')}` });

  model.events.forEach((event, index) => {
    if (isProbabilityEvent(event)) return;
    for (const [key, plan] of [['proofTest', event.proofTest], ['partialTest', event.partialTest]] as const) {
      if (!plan) continue;
      if (plan.intervalHours > model.mission.hours) {
        issues.push({ path: ['events', index, key, 'intervalHours'], message: `event "${event.id}": ${key} interval ${plan.intervalHours} h is longer than the mission (${model.mission.hours} h)` });
      }
      if (plan.firstHours !== undefined && plan.firstHours > model.mission.hours) {
        issues.push({ path: ['events', index, key, 'firstHours'], message: `event "${event.id}": first ${key} at ${plan.firstHours} h is after the mission end (${model.mission.hours} h)` });
      }
    }
    const test = event.proofTest;
    if (test && event.partialTest && event.partialTest.coverage > (test.coverage ?? 1)) {
      issues.push({ path: ['events', index, 'partialTest', 'coverage'], message: `event "${event.id}": partial test coverage ${event.partialTest.coverage} is above the proof test coverage ${test.coverage ?? 1} (the proof test reveals everything the partial test reveals)` });
    }
    if (test && test.durationHours !== undefined && test.durationHours >= test.intervalHours) {
      issues.push({ path: ['events', index, 'proofTest', 'durationHours'], message: `event "${event.id}": the proof test lasts as long as its interval or longer` });
    }
  });

  const inGroup = new Map<string, string>();
  (model.ccf ?? []).forEach((group, index) => {
    group.members.forEach((member, memberIndex) => {
      const event = model.events.find((candidate) => candidate.id === member);
      if (!event) {
        issues.push({ path: ['ccf', index, 'members', memberIndex], message: `common-cause group "${group.id}" has unknown member "${member}"` });
      } else if (isProbabilityEvent(event)) {
        issues.push({ path: ['ccf', index, 'members', memberIndex], message: `common-cause group "${group.id}": member "${member}" has a fixed probability, not rates` });
      }
      const other = inGroup.get(member);
      if (other !== undefined && other !== group.id) {
        issues.push({ path: ['ccf', index, 'members', memberIndex], message: `event "${member}" is in two common-cause groups ("${other}" and "${group.id}")` });
      }
      inGroup.set(member, group.id);
    });
    if (new Set(group.members).size !== group.members.length) {
      issues.push({ path: ['ccf', index, 'members'], message: `common-cause group "${group.id}" lists a member twice` });
    }
    if (group.factor !== undefined && group.model !== 'pds') {
      issues.push({ path: ['ccf', index, 'factor'], message: `common-cause group "${group.id}": factor is only used with model "pds"` });
    }
  });
  issues.push(...duplicateIds(model.ccf ?? [], 'ccf'));
  return issues;
}

function findGateCycle(gates: Gate[]): string[] | undefined {
  const byId = new Map(gates.map((item) => [item.id, item]));
  const state = new Map<string, 'open' | 'done'>();
  const stack: string[] = [];
  const visit = (id: string): string[] | undefined => {
    const mark = state.get(id);
    if (mark === 'done') return undefined;
    if (mark === 'open') return [...stack.slice(stack.indexOf(id)), id];
    const node = byId.get(id);
    if (!node) return undefined;
    state.set(id, 'open');
    stack.push(id);
    for (const input of node.inputs) {
      const found = visit(input);
      if (found) return found;
    }
    stack.pop();
    state.set(id, 'done');
    return undefined;
  };
  for (const item of gates) {
    const found = visit(item.id);
    if (found) return found;
  }
  return undefined;
}

/** Reference checks of a state model: unknown states, self transitions, initial distribution, test rows. */
export function markovIssues(model: z.infer<typeof markovModelShape>): Issue[] {
  const issues = stateChainIssues(model, model.mission.hours);
  (model.parts ?? []).forEach((part, partIndex) => {
    for (const issue of stateChainIssues(part, model.mission.hours)) {
      issues.push({ path: ['parts', partIndex, ...issue.path], message: `part "${part.id}": ${issue.message}` });
    }
  });
  issues.push(...duplicateIds(model.parts ?? [], 'parts'));
  return issues;
}

type StateChain = Pick<MarkovPart, 'states' | 'transitions' | 'tests'>;

/**
 * Linear in the size of the chain and free of per-item strings, since a generated chain can hold millions
 * of transitions: states are numbered once, repeated transitions are found by bucketing them by source
 * state (a stable counting sort) and marking targets per bucket, test rows are summed in typed arrays.
 */
function stateChainIssues(model: StateChain, missionHours: number): Issue[] {
  const issues: Issue[] = [...duplicateIds(model.states, 'states')];
  const stateCount = model.states.length;
  const stateIndex = new Map<string, number>();
  let initialSum = 0;
  model.states.forEach((state, index) => {
    if (!stateIndex.has(state.id)) stateIndex.set(state.id, index);
    initialSum += state.initial ?? 0;
  });
  if (Math.abs(initialSum - 1) > 1e-9) {
    issues.push({ path: ['states'], message: `the initial probabilities sum to ${initialSum}, not 1` });
  }
  const transitionCount = model.transitions.length;
  const sources = new Int32Array(transitionCount);
  const targets = new Int32Array(transitionCount);
  const perSource = new Int32Array(stateCount + 1);
  model.transitions.forEach((transition, index) => {
    sources[index] = stateIndex.get(transition.from) ?? -1;
    targets[index] = stateIndex.get(transition.to) ?? -1;
    if (sources[index] >= 0) perSource[sources[index] + 1] += 1;
  });
  for (let state = 0; state < stateCount; state += 1) perSource[state + 1] += perSource[state];
  const bySource = new Int32Array(perSource[stateCount]);
  const fill = perSource.slice(0, stateCount);
  for (let index = 0; index < transitionCount; index += 1) if (sources[index] >= 0) bySource[fill[sources[index]]++] = index;
  const repeats = new Int32Array(transitionCount).fill(-1);
  const seenFrom = new Int32Array(stateCount).fill(-1);
  const firstAt = new Int32Array(stateCount);
  for (let source = 0; source < stateCount; source += 1) {
    for (let slot = perSource[source]; slot < perSource[source + 1]; slot += 1) {
      const index = bySource[slot];
      const target = targets[index];
      if (target < 0) continue;
      if (seenFrom[target] === source) repeats[index] = firstAt[target];
      else {
        seenFrom[target] = source;
        firstAt[target] = index;
      }
    }
  }
  model.transitions.forEach((transition, index) => {
    for (const end of ['from', 'to'] as const) {
      if ((end === 'from' ? sources : targets)[index] < 0) {
        issues.push({ path: ['transitions', index, end], message: `transition ${index} refers to unknown state "${transition[end]}"` });
      }
    }
    if (transition.from === transition.to) {
      issues.push({ path: ['transitions', index, 'to'], message: `transition ${index} goes from "${transition.from}" into the same state` });
    }
    if (repeats[index] >= 0) {
      issues.push({ path: ['transitions', index], message: `transition ${index} repeats "${transition.from}" -> "${transition.to}" (also transitions[${repeats[index]}])` });
    }
  });
  const rowSums = new Float64Array(stateCount);
  const rowOfTest = new Int32Array(stateCount).fill(-1);
  (model.tests ?? []).forEach((test, testIndex) => {
    if (test.intervalHours > missionHours) {
      issues.push({ path: ['tests', testIndex, 'intervalHours'], message: `test ${testIndex}: interval ${test.intervalHours} h is longer than the mission (${missionHours} h)` });
    }
    if (test.firstHours !== undefined && test.firstHours > missionHours) {
      issues.push({ path: ['tests', testIndex, 'firstHours'], message: `test ${testIndex}: first test at ${test.firstHours} h is after the mission end (${missionHours} h)` });
    }
    const rowOrder: number[] = [];
    test.moves.forEach((move, moveIndex) => {
      for (const end of ['from', 'to'] as const) {
        if (!stateIndex.has(move[end])) {
          issues.push({ path: ['tests', testIndex, 'moves', moveIndex, end], message: `test ${testIndex} moves ${end} unknown state "${move[end]}"` });
        }
      }
      const source = stateIndex.get(move.from);
      if (source === undefined) return;
      if (rowOfTest[source] !== testIndex) {
        rowOfTest[source] = testIndex;
        rowSums[source] = 0;
        rowOrder.push(source);
      }
      rowSums[source] += move.probability;
    });
    for (const source of rowOrder) {
      const sum = rowSums[source];
      if (Math.abs(sum - 1) > 1e-9) {
        issues.push({ path: ['tests', testIndex, 'moves'], message: `test ${testIndex}: the moves out of "${model.states[source].id}" sum to ${sum}, not 1` });
      }
    }
  });
  return issues;
}

function withIssues<T extends z.ZodType>(shape: T, check: (model: z.infer<T>) => Issue[]) {
  return shape.superRefine((model, context) => {
    for (const issue of check(model)) context.addIssue({ code: 'custom', path: issue.path, message: issue.message });
  });
}

export const faultTreeModel = withIssues(faultTreeModelShape, faultTreeIssues);
export const markovModel = withIssues(markovModelShape, markovIssues);

/** A whole model file, either kind, with every reference check applied. */
export const modelFile = withIssues(z.discriminatedUnion('kind', [faultTreeModelShape, markovModelShape]), (model) =>
  model.kind === 'fault-tree' ? faultTreeIssues(model) : markovIssues(model),
);

export type FaultTreeModel = z.infer<typeof faultTreeModelShape>;
export type MarkovModel = z.infer<typeof markovModelShape>;
export type ModelFile = z.infer<typeof modelFile>;

/** Formats zod issues as "path: message" lines, the path written as in the file (events[2].lambdaDU). */
export function describeIssues(error: z.ZodError): string[] {
  return error.issues.map((issue) => `${formatPath(issue.path)}: ${issue.message}`);
}

export function formatPath(path: readonly PropertyKey[]): string {
  if (path.length === 0) return '(file)';
  return path
    .map((part, index) => (typeof part === 'number' ? `[${part}]` : index === 0 ? String(part) : `.${String(part)}`))
    .join('');
}
