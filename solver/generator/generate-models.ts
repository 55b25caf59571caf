import {
  architecture as architectureSchema,
  groupChannels,
  parseVoting,
  type Architecture,
  type ArchitectureChannel,
} from '../../shared/architecture.js';
import {
  modelFile,
  type FaultTreeModel,
  type Gate,
  type MarkovModel,
  type MarkovPart,
  type MarkovState,
  type MarkovTest,
  type MarkovTransition,
  type RateEvent,
} from '../../shared/model-file.js';
import { ModelError } from '../common/model-error.js';

/** Largest state model the generator writes (states of the main chain or of one part). */
export const MAX_GENERATED_STATES = 200_000;

/** The two models written from one architecture, and what the reader should know about them. */
export interface GeneratedModels {
  readonly markov: MarkovModel;
  readonly faultTree: FaultTreeModel;
  readonly warnings: string[];
}

/** Channel conditions in the state model. */
const OK = 0;
/** Dangerous undetected failure, found by the proof test. */
const HIDDEN = 1;
/** Dangerous undetected failure the proof test does not cover: hidden to the mission end. */
const NEVER_FOUND = 2;
/** Revealed failure under repair (DD, a DU found by a test, or a 1oo2D channel taken out by diagnostics). */
const REPAIR = 3;
const CONDITION_LETTERS = ['O', 'U', 'N', 'R'];
const CONDITION_WORDS = ['ok', 'DU hidden', 'DU not covered', 'under repair'];

interface ChannelPlan {
  readonly id: string;
  readonly lambdaDU: number;
  readonly lambdaDD: number;
  readonly lambdaSD: number;
  readonly mttrHours: number;
  readonly coverage: number;
  readonly intervalHours?: number;
  readonly firstHours?: number;
}

interface GroupPlan {
  readonly id: string;
  readonly label: string;
  readonly voting: string;
  readonly k: number;
  readonly diagnosed: boolean;
  readonly channels: readonly ChannelPlan[];
  /** Channels are identical and tested together: states count them instead of naming them. */
  readonly exchangeable: boolean;
  readonly shared?: SharedPlan;
}

/** The group's shared (common-cause) event, split as the fault-tree engine splits it. */
interface SharedPlan {
  readonly lambdaDU: number;
  readonly lambdaDD: number;
  readonly coverage: number;
  readonly mttrHours: number;
}

/** A state of one group: channel conditions, then the shared DU condition and the shared DD condition. */
type GroupState = number[];

/**
 * Writes a state model and the equivalent fault tree for an architecture of voting groups in series.
 *
 * State model: per channel the conditions ok, DU hidden (found by the proof test), DU not covered
 * (hidden to the mission end) and under repair; per group with common cause a shared DU event and a
 * shared DD event as their own components, failing every member while they last, as the fault-tree
 * engine's beta-factor model does (IEC 61508-6:2010 Annex D; geometric mean of the members' rates,
 * lowest coverage, longest MTTR). A group is down when at least k = N - M + 1 of its channels are failed
 * or a shared event is failed. A proof test moves the tested channels' hidden failures and the shared
 * hidden failure to repair (or to ok when MTTR is 0). Identical channels tested together are counted
 * rather than named (exact lumping of exchangeable channels). Without a shared crew each group is an
 * independent part; with one, the groups form one chain and one crew repairs one item at a time (the
 * first in group and channel order, shared events last).
 *
 * Detected failures (DD, and the safe detected faults that take a 1oo2D channel out) are marked
 * `detected`, so PFH counts undetected failures only, as the fault-tree engine does. One modelling
 * difference remains, second order in the rates: a channel under repair does not fail again until
 * repaired, while the fault tree treats its DU and DD modes as independent.
 *
 * @throws ModelError naming the field when the architecture is invalid or the chain is too large.
 */
export function generateModels(input: Architecture): GeneratedModels {
  const parsed = architectureSchema.safeParse(input);
  if (!parsed.success) {
    throw new ModelError(parsed.error.issues.map((issue) => ({ path: issue.path.map((part) => (typeof part === 'number' ? part : String(part))), message: issue.message })));
  }
  const spec = parsed.data;
  const warnings: string[] = [];
  const groups = spec.groups.map((group) => planGroup(group, spec, warnings));
  const faultTree = writeFaultTree(spec, groups);
  const markov = writeMarkov(spec, groups);
  if (spec.sharedRepairCrew) {
    warnings.push('the fault tree cannot express a shared repair crew: it assumes every revealed failure has its own repair');
  }
  for (const model of [markov, faultTree]) {
    const check = modelFile.safeParse(model);
    if (!check.success) throw new Error(`generator wrote an invalid ${model.kind} model: ${check.error.issues[0]?.message}`);
  }
  return { markov, faultTree, warnings };
}

function planGroup(group: Architecture['groups'][number], spec: Architecture, warnings: string[]): GroupPlan {
  const voting = parseVoting(group.voting)!;
  const channels = groupChannels(group);
  const count = channels.length;
  const beta = group.beta ?? 0;
  const betaD = group.betaD ?? beta;
  const plans: ChannelPlan[] = channels.map((channel, index) => {
    const interval = channel.proofTest?.intervalHours;
    const first = channel.proofTest ? (channel.proofTest.firstHours ?? channel.proofTest.intervalHours) : undefined;
    return {
      id: `${group.id}-${channel.id ?? index + 1}`,
      lambdaDU: channel.lambdaDU,
      lambdaDD: channel.lambdaDD ?? 0,
      lambdaSD: voting.diagnosed ? (channel.lambdaSD ?? 0) : 0,
      mttrHours: channel.mttrHours,
      coverage: channel.proofTest ? (channel.proofTest.coverage ?? 1) : 0,
      intervalHours: interval,
      firstHours: first !== undefined && spec.staggeredTests && count > 1 ? (first * (index + 1)) / count : first,
    };
  });
  const identical = channels.every((channel) => sameChannel(channel, channels[0]));
  const exchangeable = identical && !(spec.staggeredTests && count > 1);
  let shared: SharedPlan | undefined;
  if (count > 1 && (beta > 0 || betaD > 0)) {
    const tested = plans.filter((plan) => plan.intervalHours !== undefined);
    shared = {
      lambdaDU: beta * geometricMean(plans.map((plan) => plan.lambdaDU)),
      lambdaDD: betaD * geometricMean(plans.map((plan) => plan.lambdaDD)),
      coverage: tested.length === 0 ? 0 : Math.min(...tested.map((plan) => plan.coverage)),
      mttrHours: Math.max(...plans.map((plan) => plan.mttrHours)),
    };
    if (!identical) warnings.push(`group "${group.id}": the channels differ; the shared event uses the geometric mean of their rates`);
  }
  return {
    id: group.id,
    label: group.label ?? group.id,
    voting: group.voting,
    k: voting.k,
    diagnosed: voting.diagnosed,
    channels: plans.map((plan) => ({ ...plan, lambdaDU: plan.lambdaDU * (shared ? 1 - beta : 1), lambdaDD: plan.lambdaDD * (shared ? 1 - betaD : 1) })),
    exchangeable,
    shared,
  };
}

function sameChannel(a: ArchitectureChannel, b: ArchitectureChannel): boolean {
  return (
    a.lambdaDU === b.lambdaDU &&
    (a.lambdaDD ?? 0) === (b.lambdaDD ?? 0) &&
    (a.lambdaSD ?? 0) === (b.lambdaSD ?? 0) &&
    a.mttrHours === b.mttrHours &&
    a.proofTest?.intervalHours === b.proofTest?.intervalHours &&
    (a.proofTest?.firstHours ?? a.proofTest?.intervalHours) === (b.proofTest?.firstHours ?? b.proofTest?.intervalHours) &&
    (a.proofTest?.coverage ?? 1) === (b.proofTest?.coverage ?? 1)
  );
}

function geometricMean(values: number[]): number {
  if (values.some((value) => value === 0)) return 0;
  return Math.exp(values.reduce((sum, value) => sum + Math.log(value), 0) / values.length);
}

// ---- fault tree

function writeFaultTree(spec: Architecture, groups: readonly GroupPlan[]): FaultTreeModel {
  const events: RateEvent[] = [];
  const gates: Gate[] = [];
  const ccf: NonNullable<FaultTreeModel['ccf']> = [];
  spec.groups.forEach((source, groupIndex) => {
    const group = groups[groupIndex];
    const channels = groupChannels(source);
    const inputs: string[] = [];
    channels.forEach((channel, index) => {
      const plan = group.channels[index];
      const event: RateEvent = { id: plan.id, label: channel.label ?? `${group.label} channel ${index + 1}`, lambdaDU: channel.lambdaDU };
      if ((channel.lambdaDD ?? 0) > 0) event.lambdaDD = channel.lambdaDD;
      event.mttrHours = channel.mttrHours;
      if (plan.intervalHours !== undefined) {
        event.proofTest = { intervalHours: plan.intervalHours, firstHours: plan.firstHours, coverage: plan.coverage };
      }
      events.push(event);
      if (plan.lambdaSD > 0) {
        events.push({ id: `${plan.id}-SD`, label: `${event.label}: safe detected fault, channel taken out`, lambdaDU: 0, lambdaDD: plan.lambdaSD, mttrHours: channel.mttrHours });
        gates.push({ id: `${plan.id}-OUT`, label: `${event.label} failed or taken out`, type: 'or', inputs: [plan.id, `${plan.id}-SD`] });
        inputs.push(`${plan.id}-OUT`);
      } else {
        inputs.push(plan.id);
      }
    });
    gates.push({ id: group.id, label: `${group.label} (${group.voting})`, type: 'atLeast', k: group.k, inputs });
    if (group.shared) {
      ccf.push({ id: `${group.id}-CCF`, members: group.channels.map((plan) => plan.id), beta: source.beta ?? 0, betaD: source.betaD ?? source.beta ?? 0, model: 'beta' });
    }
  });
  let top = groups[0].id;
  if (groups.length > 1) {
    const taken = new Set([...events.map((event) => event.id), ...gates.map((item) => item.id)]);
    top = 'FUNCTION';
    for (let suffix = 1; taken.has(top); suffix += 1) top = `FUNCTION-${suffix}`;
    gates.unshift({ id: top, label: 'Safety function fails', type: 'or', inputs: groups.map((group) => group.id) });
  }
  return {
    format: 'proofline/model',
    version: 1,
    name: spec.name,
    ...(spec.description ? { description: spec.description } : {}),
    kind: 'fault-tree',
    mission: spec.mission,
    events,
    gates,
    ...(ccf.length > 0 ? { ccf } : {}),
    top,
  };
}

// ---- state model

interface Schedule {
  readonly intervalHours: number;
  readonly firstHours: number;
  /** [group, channel] tested at these times. */
  readonly tested: [number, number][];
}

function writeMarkov(spec: Architecture, groups: readonly GroupPlan[]): MarkovModel {
  const header = {
    format: 'proofline/model' as const,
    version: 1 as const,
    name: spec.name,
    ...(spec.description ? { description: spec.description } : {}),
    kind: 'markov' as const,
    mission: spec.mission,
  };
  if (spec.sharedRepairCrew) {
    const chain = buildChain(groups, true);
    return { ...header, ...chain };
  }
  const chains = groups.map((group) => buildChain([group], false));
  const [first, ...rest] = chains;
  const parts: MarkovPart[] = rest.map((chain, index) => ({ id: groups[index + 1].id, label: groups[index + 1].label, ...chain }));
  return { ...header, ...first, ...(parts.length > 0 ? { parts } : {}) };
}

interface ChainText {
  states: MarkovState[];
  transitions: MarkovTransition[];
  tests?: MarkovTest[];
}

function buildChain(groups: readonly GroupPlan[], sharedCrew: boolean): ChainText {
  const schedules = testSchedules(groups);
  const initial = groups.map((group) => [...group.channels.map(() => OK), OK, OK]);
  const keyOf = (state: GroupState[]) => state.map((group) => group.join('')).join('|');
  const index = new Map<string, number>();
  const states: GroupState[][] = [];
  const transitions: RawTransition[] = [];
  const testMoves: { from: number; to: number }[][] = schedules.map(() => []);
  const visit = (state: GroupState[]): number => {
    const canonical = state.map((group, position) => canonicalGroup(groups[position], group));
    const key = keyOf(canonical);
    let found = index.get(key);
    if (found === undefined) {
      found = states.length;
      if (found >= MAX_GENERATED_STATES) {
        throw new ModelError([{ path: ['groups'], message: `the state model would have more than ${MAX_GENERATED_STATES.toLocaleString('en-US')} states; use fewer or identical channels, or no shared repair crew` }]);
      }
      index.set(key, found);
      states.push(canonical);
    }
    return found;
  };
  visit(initial);
  for (let position = 0; position < states.length; position += 1) {
    const state = states[position];
    for (const { target, rate, detected } of stateTransitions(groups, state, sharedCrew)) {
      if (rate > 0) transitions.push({ from: position, to: visit(target), rate, detected: detected ?? false });
    }
    schedules.forEach((schedule, scheduleIndex) => {
      const target = applyScheduleTest(groups, state, schedule);
      const to = visit(target);
      if (to !== position) testMoves[scheduleIndex].push({ from: position, to });
    });
  }
  const merged = mergeTransitions(transitions);
  const ids = stateIds(groups, states);
  return {
    states: states.map((state, position) => ({
      id: ids[position],
      label: stateLabel(groups, state),
      ...(position === 0 ? { initial: 1 } : {}),
      ...(isDown(groups, state) ? { down: true } : {}),
    })),
    transitions: merged.map((transition) => ({ from: ids[transition.from], to: ids[transition.to], rate: transition.rate, ...(transition.detected ? { detected: true } : {}) })),
    ...(schedules.length > 0
      ? {
          tests: schedules
            .map((schedule, scheduleIndex) => ({
              label: `proof test of ${schedule.tested.map(([group, channel]) => groups[group].channels[channel].id).join(', ')}`,
              intervalHours: schedule.intervalHours,
              firstHours: schedule.firstHours,
              moves: testMoves[scheduleIndex].map((move) => ({ from: ids[move.from], to: ids[move.to], probability: 1 })),
            }))
            .filter((test) => test.moves.length > 0),
        }
      : {}),
  };
}

function testSchedules(groups: readonly GroupPlan[]): Schedule[] {
  const byKey = new Map<string, Schedule>();
  groups.forEach((group, groupIndex) =>
    group.channels.forEach((channel, channelIndex) => {
      if (channel.intervalHours === undefined || channel.firstHours === undefined) return;
      const key = `${channel.intervalHours}/${channel.firstHours}`;
      const schedule = byKey.get(key) ?? { intervalHours: channel.intervalHours, firstHours: channel.firstHours, tested: [] };
      schedule.tested.push([groupIndex, channelIndex]);
      byKey.set(key, schedule);
    }),
  );
  return [...byKey.values()];
}

function canonicalGroup(group: GroupPlan, state: GroupState): GroupState {
  if (!group.exchangeable) return state;
  let ordered = true;
  for (let slot = 1; slot < group.channels.length && ordered; slot += 1) ordered = state[slot - 1] <= state[slot];
  if (ordered) return state;
  const channels = state.slice(0, group.channels.length).sort((a, b) => a - b);
  return [...channels, state[group.channels.length], state[group.channels.length + 1]];
}

function channelFailed(state: GroupState, channel: number): boolean {
  return state[channel] !== OK;
}

function isDown(groups: readonly GroupPlan[], state: GroupState[]): boolean {
  return groups.some((group, position) => {
    const condition = state[position];
    const size = group.channels.length;
    if (condition[size] !== OK || condition[size + 1] !== OK) return true;
    let failed = 0;
    for (let channel = 0; channel < size; channel += 1) if (channelFailed(condition, channel)) failed += 1;
    return failed >= group.k;
  });
}

function* stateTransitions(groups: readonly GroupPlan[], state: GroupState[], sharedCrew: boolean): Generator<{ target: GroupState[]; rate: number; detected?: boolean }> {
  const change = (groupIndex: number, slot: number, value: number): GroupState[] =>
    state.map((group, position) => (position === groupIndex ? group.map((entry, index) => (index === slot ? value : entry)) : group));
  const crewOn = sharedCrew ? firstUnderRepair(groups, state) : undefined;
  for (let groupIndex = 0; groupIndex < groups.length; groupIndex += 1) {
    const group = groups[groupIndex];
    const condition = state[groupIndex];
    const size = group.channels.length;
    const repairs = (slot: number) => !sharedCrew || (crewOn !== undefined && crewOn[0] === groupIndex && crewOn[1] === slot);
    for (let slot = 0; slot < size; slot += 1) {
      const channel = group.channels[slot];
      if (condition[slot] === OK) {
        yield { target: change(groupIndex, slot, HIDDEN), rate: channel.lambdaDU * channel.coverage };
        yield { target: change(groupIndex, slot, NEVER_FOUND), rate: channel.lambdaDU * (1 - channel.coverage) };
        yield { target: change(groupIndex, slot, REPAIR), rate: channel.lambdaDD + channel.lambdaSD, detected: true };
      } else if (condition[slot] === REPAIR && repairs(slot)) {
        yield { target: change(groupIndex, slot, OK), rate: 1 / channel.mttrHours };
      }
    }
    const shared = group.shared;
    if (!shared) continue;
    if (condition[size] === OK) {
      yield { target: change(groupIndex, size, HIDDEN), rate: shared.lambdaDU * shared.coverage };
      yield { target: change(groupIndex, size, NEVER_FOUND), rate: shared.lambdaDU * (1 - shared.coverage) };
    } else if (condition[size] === REPAIR && repairs(size)) {
      yield { target: change(groupIndex, size, OK), rate: 1 / shared.mttrHours };
    }
    if (condition[size + 1] === OK) {
      yield { target: change(groupIndex, size + 1, REPAIR), rate: shared.lambdaDD, detected: true };
    } else if (repairs(size + 1)) {
      yield { target: change(groupIndex, size + 1, OK), rate: 1 / shared.mttrHours };
    }
  }
}

/** The item the shared crew works on: the first under repair in group, channel, shared-event order. */
function firstUnderRepair(groups: readonly GroupPlan[], state: GroupState[]): [number, number] | undefined {
  for (let groupIndex = 0; groupIndex < groups.length; groupIndex += 1) {
    const condition = state[groupIndex];
    for (let slot = 0; slot < condition.length; slot += 1) {
      if (condition[slot] === REPAIR && (slot < groups[groupIndex].channels.length || groups[groupIndex].shared)) return [groupIndex, slot];
    }
  }
  return undefined;
}

function applyScheduleTest(groups: readonly GroupPlan[], state: GroupState[], schedule: Schedule): GroupState[] {
  const next = state.map((group) => [...group]);
  for (const [groupIndex, slot] of schedule.tested) {
    const group = groups[groupIndex];
    if (next[groupIndex][slot] === HIDDEN) next[groupIndex][slot] = group.channels[slot].mttrHours > 0 ? REPAIR : OK;
    const size = group.channels.length;
    if (group.shared && next[groupIndex][size] === HIDDEN) next[groupIndex][size] = group.shared.mttrHours > 0 ? REPAIR : OK;
  }
  return next;
}

interface RawTransition {
  readonly from: number;
  readonly to: number;
  rate: number;
  readonly detected: boolean;
}

/** Sums parallel transitions; detected and undetected ones stay apart (PFH counts only the latter). */
function mergeTransitions(transitions: RawTransition[]): RawTransition[] {
  const merged = new Map<string, RawTransition>();
  for (const transition of transitions) {
    if (transition.from === transition.to) continue;
    const key = `${transition.from}/${transition.to}/${transition.detected}`;
    const existing = merged.get(key);
    if (existing) existing.rate += transition.rate;
    else merged.set(key, { ...transition });
  }
  return [...merged.values()];
}

function stateIds(groups: readonly GroupPlan[], states: GroupState[][]): string[] {
  const codes = states.map((state) =>
    state
      .map((condition, position) => {
        const size = groups[position].channels.length;
        const channels = condition.slice(0, size).map((value) => CONDITION_LETTERS[value]).join('');
        return groups[position].shared ? `${channels}-${CONDITION_LETTERS[condition[size]]}${CONDITION_LETTERS[condition[size + 1]]}` : channels;
      })
      .join('_'),
  );
  return codes.some((code) => code.length > 64) ? states.map((_, position) => `S${position}`) : codes;
}

function stateLabel(groups: readonly GroupPlan[], state: GroupState[]): string {
  const text = state
    .map((condition, position) => {
      const group = groups[position];
      const size = group.channels.length;
      const parts: string[] = [];
      if (group.exchangeable) {
        for (let value = 0; value < CONDITION_WORDS.length; value += 1) {
          const count = condition.slice(0, size).filter((entry) => entry === value).length;
          if (count > 0) parts.push(`${count} ${CONDITION_WORDS[value]}`);
        }
      } else {
        condition.slice(0, size).forEach((value, channel) => parts.push(`${group.channels[channel].id} ${CONDITION_WORDS[value]}`));
      }
      if (group.shared && condition[size] !== OK) parts.push(`common cause ${CONDITION_WORDS[condition[size]]}`);
      if (group.shared && condition[size + 1] !== OK) parts.push('common cause DD under repair');
      return `${group.id}: ${parts.join(', ')}`;
    })
    .join('; ');
  return text.length > 200 ? `${text.slice(0, 197)}...` : text;
}
