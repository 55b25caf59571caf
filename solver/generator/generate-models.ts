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
import { pdsFactor } from '../formulas/pds.js';

/** Largest state model the generator writes (states of the main chain or of one part). */
export const MAX_GENERATED_STATES = 200_000;

/** The two models written from one architecture, and what the reader should know about them. */
export interface GeneratedModels {
  readonly markov: MarkovModel;
  readonly faultTree: FaultTreeModel;
  readonly warnings: string[];
}

/**
 * Conditions of a channel (or of a group's shared event) in the state model. A condition plus UNDER_TEST
 * is the same condition while the channel is out of service for its proof test.
 */
const OK = 0;
/** Dangerous undetected failure that the partial test (and the proof test) reveals. */
const HIDDEN_PARTIAL = 1;
/** Dangerous undetected failure that only the proof test reveals. */
const HIDDEN = 2;
/** Dangerous undetected failure no test reveals: hidden to the mission end. */
const NEVER_FOUND = 3;
/** Revealed failure under repair (DD, a DU found by a test, or a 1oo2D channel taken out by diagnostics). */
const REPAIR = 4;
const UNDER_TEST = 5;
const CONDITION_LETTERS = ['O', 'P', 'U', 'N', 'R', 'o', 'p', 'u', 'n', 'r'];
const CONDITION_WORDS = ['ok', 'DU hidden (partial test reveals it)', 'DU hidden', 'DU not covered', 'under repair'];

/** How a channel's (or shared event's) DU failures split by the test that reveals them. */
interface FailureSplit {
  /** Rates per hour into HIDDEN_PARTIAL, HIDDEN and NEVER_FOUND. */
  readonly toPartial: number;
  readonly toHidden: number;
  readonly toNever: number;
}

interface ChannelPlan {
  readonly id: string;
  readonly lambdaDU: number;
  readonly lambdaDD: number;
  readonly lambdaSD: number;
  readonly mttrHours: number;
  readonly proofCoverage: number;
  readonly intervalHours?: number;
  readonly firstHours?: number;
  /** Hours the channel is out of service at each proof test (0: none). */
  readonly durationHours: number;
  readonly partialCoverage: number;
  readonly partialIntervalHours?: number;
  readonly partialFirstHours?: number;
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
  /** C_MooN of the PDS method (1 for the beta model), and whether the fault tree must state it. */
  readonly factor: number;
  readonly writeFactor: boolean;
}

/** The group's shared (common-cause) event, split as the fault-tree engine splits it. */
interface SharedPlan {
  readonly lambdaDU: number;
  readonly lambdaDD: number;
  readonly partialShare: number;
  readonly proofShare: number;
  readonly mttrHours: number;
}

/**
 * Writes a state model and the equivalent fault tree for an architecture of voting groups in series.
 *
 * State model: per channel the conditions ok, DU hidden until a partial or proof test, DU hidden until a
 * proof test, DU not covered (hidden to the mission end) and under repair, each also "under test" while
 * the channel is out of service for a proof test that lasts `durationHours` (entered at the test, left
 * at its end; failures and repairs go on meanwhile, as in the fault-tree engine). A group is down when
 * at least k = N - M + 1 of its channels are failed or under test, or its common cause has failed it.
 * DU failures split as the fault-tree engine splits them (docs/model-format.md): the share
 * `partialTest.coverage` is revealed by partial and proof tests, up to `proofTest.coverage` by proof
 * tests only, the rest never. A test moves the hidden failures it reveals to repair (or to ok when MTTR
 * is 0). Identical channels tested together are counted rather than named (exact lumping of
 * exchangeable channels).
 *
 * Common cause, beta-factor model (IEC 61508-6:2010 Annex D) or the PDS method (beta times C_MooN of the
 * voting, SINTEF PDS method handbook 2013): the members keep (1 - beta) of their rates, and the shared
 * rate beta C lambda (geometric mean of the members' rates, lowest coverages, longest MTTR) fails them
 * all. Without a shared crew it is written as the fault tree writes it, a shared DU event and a shared
 * DD event of their own that fail the group while they last and are revealed by any member's test; each
 * group is then an independent part. With a shared repair crew the groups form one chain, one crew
 * repairs one channel at a time (the first in group and channel order), and a common-cause failure is
 * written as a jump of every working channel of the group into the failed condition (the usual state
 * model of common cause, Rausand & Hoyland, System Reliability Theory, 2nd ed., sec. 10.4): a crew
 * repairs channels, not causes, so each channel the cause failed waits for it.
 *
 * Detected failures (DD, and the safe detected faults that take a 1oo2D channel out) are marked
 * `detected`, so PFH counts undetected failures only, as the fault-tree engine does. One modelling
 * difference remains, second order in the rates: a channel is in one condition at a time (failed
 * channels do not fail again until renewed), while the fault tree treats its DD, partial-test, proof-test
 * and uncovered DU modes as independent failures of one event.
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
  const groups = spec.groups.map((group, index) => planGroup(group, index, spec, warnings));
  const faultTree = writeFaultTree(spec, groups);
  const markov = writeMarkov(spec, groups);
  if (spec.sharedRepairCrew) {
    warnings.push('the fault tree cannot express a shared repair crew: it assumes every revealed failure has its own repair');
    if (groups.some((group) => group.shared)) {
      warnings.push('with a shared repair crew the state model writes a common-cause failure as every working channel of the group failing at once, each then repaired by the crew');
    }
  }
  // The fault tree is checked here; the state model, which can hold a million entries, is checked by the
  // tests (a whole-file check of it would take as long as writing it).
  const check = modelFile.safeParse(faultTree);
  if (!check.success) throw new Error(`generator wrote an invalid fault tree: ${check.error.issues[0]?.message}`);
  return { markov, faultTree, warnings };
}

function planGroup(group: Architecture['groups'][number], groupIndex: number, spec: Architecture, warnings: string[]): GroupPlan {
  const voting = parseVoting(group.voting)!;
  const channels = groupChannels(group);
  const count = channels.length;
  const beta = group.beta ?? 0;
  const betaD = group.betaD ?? beta;
  const stagger = (first: number | undefined, index: number) => (first !== undefined && spec.staggeredTests && count > 1 ? (first * (index + 1)) / count : first);
  const plans: ChannelPlan[] = channels.map((channel, index) => {
    const proof = channel.proofTest;
    const partial = channel.partialTest;
    return {
      id: `${group.id}-${channel.id ?? index + 1}`,
      lambdaDU: channel.lambdaDU,
      lambdaDD: channel.lambdaDD ?? 0,
      lambdaSD: voting.diagnosed ? (channel.lambdaSD ?? 0) : 0,
      mttrHours: channel.mttrHours,
      proofCoverage: proof ? (proof.coverage ?? 1) : 0,
      intervalHours: proof?.intervalHours,
      firstHours: stagger(proof ? (proof.firstHours ?? proof.intervalHours) : undefined, index),
      durationHours: proof?.durationHours ?? 0,
      partialCoverage: partial ? partial.coverage : 0,
      partialIntervalHours: partial?.intervalHours,
      partialFirstHours: stagger(partial ? (partial.firstHours ?? partial.intervalHours) : undefined, index),
    };
  });
  const identical = channels.every((channel) => sameChannel(channel, channels[0]));
  const exchangeable = identical && !(spec.staggeredTests && count > 1);
  const pds = group.commonCauseModel === 'pds';
  let factor = 1;
  let writeFactor = false;
  if (pds && count > 1 && (beta > 0 || betaD > 0)) {
    const looked = pdsFactor(voting.m, voting.n);
    if (group.pdsFactor === undefined && looked === undefined) {
      throw new ModelError([{ path: ['groups', groupIndex, 'pdsFactor'], message: `group "${group.id}": the PDS table has no C_MooN for ${voting.m}oo${voting.n}; give pdsFactor` }]);
    }
    factor = group.pdsFactor ?? looked!;
    // The fault-tree engine looks C_MooN up from the gate whose inputs are exactly the members; a 1oo2D
    // gate votes over "failed or taken out" gates, so there the factor is written out.
    writeFactor = group.pdsFactor !== undefined || plans.some((plan) => plan.lambdaSD > 0);
  }
  let shared: SharedPlan | undefined;
  if (count > 1 && (beta > 0 || betaD > 0)) {
    const tested = plans.filter((plan) => hasTimes(plan.intervalHours, plan.firstHours, spec.mission.hours));
    const partialTested = plans.filter((plan) => hasTimes(plan.partialIntervalHours, plan.partialFirstHours, spec.mission.hours));
    const partialShare = partialTested.length > 0 ? Math.min(...partialTested.map((plan) => plan.partialCoverage)) : 0;
    const proofShare = tested.length > 0 ? Math.max(Math.min(...tested.map((plan) => plan.proofCoverage)), partialShare) : partialShare;
    shared = {
      lambdaDU: beta * factor * geometricMean(plans.map((plan) => plan.lambdaDU)),
      lambdaDD: betaD * factor * geometricMean(plans.map((plan) => plan.lambdaDD)),
      partialShare,
      proofShare,
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
    factor,
    writeFactor,
  };
}

/** Whether a test plan has a test strictly before the mission end (as the engines count tests). */
function hasTimes(intervalHours: number | undefined, firstHours: number | undefined, missionHours: number): boolean {
  return intervalHours !== undefined && firstHours !== undefined && firstHours < missionHours;
}

function sameChannel(a: ArchitectureChannel, b: ArchitectureChannel): boolean {
  return (
    a.lambdaDU === b.lambdaDU &&
    (a.lambdaDD ?? 0) === (b.lambdaDD ?? 0) &&
    (a.lambdaSD ?? 0) === (b.lambdaSD ?? 0) &&
    a.mttrHours === b.mttrHours &&
    a.proofTest?.intervalHours === b.proofTest?.intervalHours &&
    (a.proofTest?.firstHours ?? a.proofTest?.intervalHours) === (b.proofTest?.firstHours ?? b.proofTest?.intervalHours) &&
    (a.proofTest?.coverage ?? 1) === (b.proofTest?.coverage ?? 1) &&
    (a.proofTest?.durationHours ?? 0) === (b.proofTest?.durationHours ?? 0) &&
    a.partialTest?.intervalHours === b.partialTest?.intervalHours &&
    (a.partialTest?.firstHours ?? a.partialTest?.intervalHours) === (b.partialTest?.firstHours ?? b.partialTest?.intervalHours) &&
    a.partialTest?.coverage === b.partialTest?.coverage
  );
}

function geometricMean(values: number[]): number {
  if (values.some((value) => value === 0)) return 0;
  return Math.exp(values.reduce((sum, value) => sum + Math.log(value), 0) / values.length);
}

function channelSplit(plan: ChannelPlan, missionHours: number): FailureSplit {
  const partialShare = hasTimes(plan.partialIntervalHours, plan.partialFirstHours, missionHours) ? plan.partialCoverage : 0;
  const proofShare = hasTimes(plan.intervalHours, plan.firstHours, missionHours) ? Math.max(plan.proofCoverage, partialShare) : partialShare;
  return split(plan.lambdaDU, partialShare, proofShare);
}

function split(lambdaDU: number, partialShare: number, proofShare: number): FailureSplit {
  return { toPartial: lambdaDU * partialShare, toHidden: lambdaDU * (proofShare - partialShare), toNever: lambdaDU * (1 - proofShare) };
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
        event.proofTest = {
          intervalHours: plan.intervalHours,
          firstHours: plan.firstHours,
          coverage: plan.proofCoverage,
          ...(plan.durationHours > 0 ? { durationHours: plan.durationHours } : {}),
        };
      }
      if (plan.partialIntervalHours !== undefined) {
        event.partialTest = { intervalHours: plan.partialIntervalHours, firstHours: plan.partialFirstHours, coverage: plan.partialCoverage };
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
      ccf.push({
        id: `${group.id}-CCF`,
        members: group.channels.map((plan) => plan.id),
        beta: source.beta ?? 0,
        betaD: source.betaD ?? source.beta ?? 0,
        model: source.commonCauseModel ?? 'beta',
        ...(group.writeFactor ? { factor: group.factor } : {}),
      });
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

/** Tests at one interval and first time: proof tests, partial tests, or the ends of timed proof tests. */
interface TestSchedule {
  readonly kind: 'proof' | 'partial' | 'end';
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
  const missionHours = spec.mission.hours;
  if (spec.sharedRepairCrew) return { ...header, ...buildChain(groups, true, missionHours) };
  const chains = groups.map((group) => buildChain([group], false, missionHours));
  const [first, ...rest] = chains;
  const parts: MarkovPart[] = rest.map((chain, index) => ({ id: groups[index + 1].id, label: groups[index + 1].label, ...chain }));
  return { ...header, ...first, ...(parts.length > 0 ? { parts } : {}) };
}

interface ChainText {
  states: MarkovState[];
  transitions: MarkovTransition[];
  tests?: MarkovTest[];
}

/**
 * Where each group's conditions sit in a state's slots: its channels, then (shared-event form) its shared
 * DU and shared DD events.
 */
interface SlotLayout {
  readonly offset: number;
  readonly channels: number;
  readonly sharedSlots: boolean;
  readonly splits: readonly FailureSplit[];
  readonly sharedSplit?: FailureSplit;
}

/**
 * Explores the reachable states from "all ok" breadth first. A state is a byte per slot; exchangeable
 * channels are kept sorted within their group, so a count of conditions is one state. Transitions from a
 * state are merged by target before they are stored (parallel rates add up).
 */
function buildChain(groups: readonly GroupPlan[], sharedCrew: boolean, missionHours: number): ChainText {
  const layouts: SlotLayout[] = [];
  let slotCount = 0;
  for (const group of groups) {
    const sharedSlots = !sharedCrew && group.shared !== undefined;
    layouts.push({
      offset: slotCount,
      channels: group.channels.length,
      sharedSlots,
      splits: group.channels.map((plan) => channelSplit(plan, missionHours)),
      sharedSplit: group.shared ? split(group.shared.lambdaDU, group.shared.partialShare, group.shared.proofShare) : undefined,
    });
    slotCount += group.channels.length + (sharedSlots ? 2 : 0);
  }
  const schedules = testSchedules(groups, missionHours);
  const states: Uint8Array[] = [];
  const index = new Map<number | string, number>();
  // Up to 13 slots of 4 bits fit a double exactly: a number key hashes several times faster than a string.
  const numericKeys = slotCount <= 13;
  /** The state index of a target written into `scratch` (added when new). */
  const visit = (scratch: Uint8Array): number => {
    canonicalize(groups, layouts, scratch);
    let key: number | string;
    if (numericKeys) {
      key = 0;
      for (let slot = 0; slot < scratch.length; slot += 1) key = key * 16 + scratch[slot];
    } else {
      key = String.fromCharCode.apply(null, scratch as unknown as number[]);
    }
    let found = index.get(key);
    if (found === undefined) {
      found = states.length;
      if (found >= MAX_GENERATED_STATES) {
        throw new ModelError([{ path: ['groups'], message: `the state model would have more than ${MAX_GENERATED_STATES.toLocaleString('en-US')} states; use fewer or identical channels, or no shared repair crew` }]);
      }
      index.set(key, found);
      states.push(Uint8Array.from(scratch));
    }
    return found;
  };
  const scratch = new Uint8Array(slotCount);
  visit(scratch);

  const from: number[] = [];
  const to: number[] = [];
  const rates: number[] = [];
  const detectedFlags: boolean[] = [];
  const moves: { from: number; to: number }[][] = schedules.map(() => []);
  const targets: number[] = [];
  const targetRates: number[] = [];
  const targetDetected: boolean[] = [];
  let position = 0;
  const addTransition = (rate: number, detected: boolean) => {
    if (!(rate > 0)) return;
    const next = visit(scratch);
    if (next === position) return;
    for (let slot = 0; slot < targets.length; slot += 1) {
      if (targets[slot] === next && targetDetected[slot] === detected) {
        targetRates[slot] += rate;
        return;
      }
    }
    targets.push(next);
    targetRates.push(rate);
    targetDetected.push(detected);
  };
  for (; position < states.length; position += 1) {
    const state = states[position];
    targets.length = 0;
    targetRates.length = 0;
    targetDetected.length = 0;
    forEachTransition(groups, layouts, state, sharedCrew, scratch, addTransition);
    for (let slot = 0; slot < targets.length; slot += 1) {
      from.push(position);
      to.push(targets[slot]);
      rates.push(targetRates[slot]);
      detectedFlags.push(targetDetected[slot]);
    }
    schedules.forEach((schedule, scheduleIndex) => {
      if (!applyScheduleTest(groups, layouts, state, schedule, scratch)) return;
      const next = visit(scratch);
      if (next !== position) moves[scheduleIndex].push({ from: position, to: next });
    });
  }

  const ids = stateIds(groups, layouts, states);
  return {
    states: states.map((state, position) => ({
      id: ids[position],
      label: stateLabel(groups, layouts, state),
      ...(position === 0 ? { initial: 1 } : {}),
      ...(isDown(groups, layouts, state) ? { down: true } : {}),
    })),
    transitions: from.map((source, slot) => ({ from: ids[source], to: ids[to[slot]], rate: rates[slot], ...(detectedFlags[slot] ? { detected: true } : {}) })),
    ...(schedules.length > 0
      ? {
          tests: schedules
            .map((schedule, scheduleIndex) => ({
              label: `${scheduleLabel(schedule.kind)} of ${schedule.tested.map(([group, channel]) => groups[group].channels[channel].id).join(', ')}`,
              intervalHours: schedule.intervalHours,
              firstHours: schedule.firstHours,
              moves: moves[scheduleIndex].map((move) => ({ from: ids[move.from], to: ids[move.to], probability: 1 })),
            }))
            .filter((test) => test.moves.length > 0),
        }
      : {}),
  };
}

function scheduleLabel(kind: TestSchedule['kind']): string {
  return kind === 'proof' ? 'proof test' : kind === 'partial' ? 'partial test' : 'end of the proof test';
}

/** The proof tests, partial tests and test ends, one schedule per (kind, interval, first time). */
function testSchedules(groups: readonly GroupPlan[], missionHours: number): TestSchedule[] {
  const byKey = new Map<string, TestSchedule>();
  const add = (kind: TestSchedule['kind'], intervalHours: number, firstHours: number, tested: [number, number]) => {
    const key = `${kind}/${intervalHours}/${firstHours}`;
    const schedule = byKey.get(key) ?? { kind, intervalHours, firstHours, tested: [] };
    schedule.tested.push(tested);
    byKey.set(key, schedule);
  };
  groups.forEach((group, groupIndex) =>
    group.channels.forEach((channel, channelIndex) => {
      if (channel.intervalHours !== undefined && channel.firstHours !== undefined) {
        add('proof', channel.intervalHours, channel.firstHours, [groupIndex, channelIndex]);
        // A test still running at the mission end has no end within it (the fault tree clips its window).
        if (channel.durationHours > 0 && channel.firstHours + channel.durationHours < missionHours) add('end', channel.intervalHours, channel.firstHours + channel.durationHours, [groupIndex, channelIndex]);
      }
      if (channel.partialIntervalHours !== undefined && channel.partialFirstHours !== undefined) {
        add('partial', channel.partialIntervalHours, channel.partialFirstHours, [groupIndex, channelIndex]);
      }
    }),
  );
  return [...byKey.values()];
}

/** Sorts the channel slots of exchangeable groups in place. */
function canonicalize(groups: readonly GroupPlan[], layouts: readonly SlotLayout[], state: Uint8Array): void {
  groups.forEach((group, groupIndex) => {
    if (!group.exchangeable) return;
    const { offset, channels } = layouts[groupIndex];
    for (let slot = offset + 1; slot < offset + channels; slot += 1) {
      const value = state[slot];
      let at = slot;
      while (at > offset && state[at - 1] > value) {
        state[at] = state[at - 1];
        at -= 1;
      }
      state[at] = value;
    }
  });
}

function isDown(groups: readonly GroupPlan[], layouts: readonly SlotLayout[], state: Uint8Array): boolean {
  return groups.some((group, groupIndex) => {
    const { offset, channels, sharedSlots } = layouts[groupIndex];
    if (sharedSlots && (state[offset + channels] !== OK || state[offset + channels + 1] !== OK)) return true;
    let failed = 0;
    for (let slot = offset; slot < offset + channels; slot += 1) if (state[slot] !== OK) failed += 1;
    return failed >= group.k;
  });
}

/**
 * Calls `emit` for every rate transition out of `state`, with its target state (not yet canonical)
 * written into `target` just before; `emit` reads it at once. Rates of zero are emitted too and skipped
 * by the caller.
 */
function forEachTransition(
  groups: readonly GroupPlan[],
  layouts: readonly SlotLayout[],
  state: Uint8Array,
  sharedCrew: boolean,
  target: Uint8Array,
  emit: (rate: number, detected: boolean) => void,
): void {
  const change = (slot: number, value: number) => {
    target.set(state);
    target[slot] = value;
  };
  const crewSlot = sharedCrew ? firstUnderRepair(layouts, state) : -1;
  groups.forEach((group, groupIndex) => {
    const { offset, channels, sharedSlots, splits, sharedSplit } = layouts[groupIndex];
    for (let index = 0; index < channels; index += 1) {
      const slot = offset + index;
      const condition = state[slot];
      const base = condition % UNDER_TEST;
      const testing = condition - base;
      const channel = group.channels[index];
      if (base === OK) {
        const rates = splits[index];
        change(slot, HIDDEN_PARTIAL + testing);
        emit(rates.toPartial, false);
        change(slot, HIDDEN + testing);
        emit(rates.toHidden, false);
        change(slot, NEVER_FOUND + testing);
        emit(rates.toNever, false);
        change(slot, REPAIR + testing);
        emit(channel.lambdaDD + channel.lambdaSD, true);
      } else if (base === REPAIR && (!sharedCrew || crewSlot === slot)) {
        change(slot, OK + testing);
        emit(1 / channel.mttrHours, false);
      }
    }
    const shared = group.shared;
    if (!shared || !sharedSplit) return;
    if (sharedSlots) {
      const du = offset + channels;
      const dd = du + 1;
      if (state[du] === OK) {
        change(du, HIDDEN_PARTIAL);
        emit(sharedSplit.toPartial, false);
        change(du, HIDDEN);
        emit(sharedSplit.toHidden, false);
        change(du, NEVER_FOUND);
        emit(sharedSplit.toNever, false);
      } else if (state[du] === REPAIR) {
        change(du, OK);
        emit(1 / shared.mttrHours, false);
      }
      if (state[dd] === OK) {
        change(dd, REPAIR);
        emit(shared.lambdaDD, true);
      } else {
        change(dd, OK);
        emit(1 / shared.mttrHours, false);
      }
      return;
    }
    // Common cause as a jump of every working channel into the same failed condition.
    let working = 0;
    for (let slot = offset; slot < offset + channels; slot += 1) if (state[slot] % UNDER_TEST === OK) working += 1;
    if (working === 0) return;
    const jump = (condition: number) => {
      target.set(state);
      for (let slot = offset; slot < offset + channels; slot += 1) if (target[slot] % UNDER_TEST === OK) target[slot] += condition;
    };
    jump(HIDDEN_PARTIAL);
    emit(sharedSplit.toPartial, false);
    jump(HIDDEN);
    emit(sharedSplit.toHidden, false);
    jump(NEVER_FOUND);
    emit(sharedSplit.toNever, false);
    jump(REPAIR);
    emit(shared.lambdaDD, true);
  });
}

/** The channel slot the shared crew works on: the first under repair in group and channel order, or -1. */
function firstUnderRepair(layouts: readonly SlotLayout[], state: Uint8Array): number {
  for (const { offset, channels } of layouts) {
    for (let slot = offset; slot < offset + channels; slot += 1) if (state[slot] % UNDER_TEST === REPAIR) return slot;
  }
  return -1;
}

/**
 * Writes into `target` the state right after a test of the schedule; false when nothing changes. A proof test reveals
 * both kinds of hidden failure, a partial test those it covers; a revealed failure goes to repair (to ok
 * when MTTR is 0). A timed proof test takes the channel out of service; its end brings it back. A group's
 * shared event (shared-event form) is revealed by the test of any of its members.
 */
function applyScheduleTest(groups: readonly GroupPlan[], layouts: readonly SlotLayout[], state: Uint8Array, schedule: TestSchedule, target: Uint8Array): boolean {
  target.set(state);
  const reveal = (condition: number, mttrHours: number, kinds: 'proof' | 'partial'): number => {
    const base = condition % UNDER_TEST;
    const revealed = base === HIDDEN_PARTIAL || (kinds === 'proof' && base === HIDDEN);
    return revealed ? condition - base + (mttrHours > 0 ? REPAIR : OK) : condition;
  };
  const sharedDone = new Set<number>();
  for (const [groupIndex, index] of schedule.tested) {
    const group = groups[groupIndex];
    const { offset, channels, sharedSlots } = layouts[groupIndex];
    const slot = offset + index;
    const channel = group.channels[index];
    if (schedule.kind === 'end') {
      if (target[slot] >= UNDER_TEST) target[slot] -= UNDER_TEST;
      continue;
    }
    target[slot] = reveal(target[slot], channel.mttrHours, schedule.kind);
    if (schedule.kind === 'proof' && channel.durationHours > 0 && target[slot] < UNDER_TEST) target[slot] += UNDER_TEST;
    if (sharedSlots && group.shared && !sharedDone.has(groupIndex)) {
      sharedDone.add(groupIndex);
      target[offset + channels] = reveal(target[offset + channels], group.shared.mttrHours, schedule.kind);
    }
  }
  for (let slot = 0; slot < target.length; slot += 1) if (target[slot] !== state[slot]) return true;
  return false;
}

function stateIds(groups: readonly GroupPlan[], layouts: readonly SlotLayout[], states: readonly Uint8Array[]): string[] {
  const codes = states.map((state) =>
    groups
      .map((_, groupIndex) => {
        const { offset, channels, sharedSlots } = layouts[groupIndex];
        let code = '';
        for (let slot = offset; slot < offset + channels; slot += 1) code += CONDITION_LETTERS[state[slot]];
        return sharedSlots ? `${code}-${CONDITION_LETTERS[state[offset + channels]]}${CONDITION_LETTERS[state[offset + channels + 1]]}` : code;
      })
      .join('_'),
  );
  return codes.some((code) => code.length > 64) ? states.map((_, position) => `S${position}`) : codes;
}

function conditionWords(condition: number): string {
  return condition >= UNDER_TEST ? `under test, ${CONDITION_WORDS[condition - UNDER_TEST]}` : CONDITION_WORDS[condition];
}

function stateLabel(groups: readonly GroupPlan[], layouts: readonly SlotLayout[], state: Uint8Array): string {
  const text = groups
    .map((group, groupIndex) => {
      const { offset, channels, sharedSlots } = layouts[groupIndex];
      const words: string[] = [];
      if (group.exchangeable) {
        for (let condition = 0; condition < CONDITION_LETTERS.length; condition += 1) {
          let count = 0;
          for (let slot = offset; slot < offset + channels; slot += 1) if (state[slot] === condition) count += 1;
          if (count > 0) words.push(`${count} ${conditionWords(condition)}`);
        }
      } else {
        for (let index = 0; index < channels; index += 1) words.push(`${group.channels[index].id} ${conditionWords(state[offset + index])}`);
      }
      if (sharedSlots && state[offset + channels] !== OK) words.push(`common cause ${CONDITION_WORDS[state[offset + channels]]}`);
      if (sharedSlots && state[offset + channels + 1] !== OK) words.push('common cause DD under repair');
      return `${group.id}: ${words.join(', ')}`;
    })
    .join('; ');
  return text.length > 200 ? `${text.slice(0, 197)}...` : text;
}
