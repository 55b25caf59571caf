import { isProbabilityEvent, type CommonCauseGroup, type FaultTreeModel, type RateEvent } from '../../shared/model-file.js';
import { ModelError } from '../common/model-error.js';
import { pdsFactor } from '../formulas/pds.js';

/**
 * One independent failure process of the simulation: a failure mode of an event, or of a common-cause
 * group's shared event. While failed it holds every event in `targets` failed.
 */
export interface SimulatedMode {
  readonly rate: number;
  /** A dangerous undetected mode: its failures count in PFH. */
  readonly undetected: boolean;
  readonly mttrHours: number;
  /** How the failure is found: 'at-once' (DD), 'tests' (at the next of revealTimes) or 'never'. */
  readonly reveal: 'at-once' | 'tests' | 'never';
  readonly revealTimes: Float64Array;
  readonly targets: Int32Array;
}

/** A fault tree ready to simulate: modes, deterministic test windows and the structure as a DAG. */
export interface CompiledSimulation {
  readonly missionHours: number;
  readonly modes: readonly SimulatedMode[];
  /** Constant on-demand probabilities (NaN for rate events). */
  readonly probabilities: Float64Array;
  /** Test windows, sorted by time: at windowTimes[i] event windowEvents[i] gains (+1) or loses (-1) a cause. */
  readonly windowTimes: Float64Array;
  readonly windowEvents: Int32Array;
  readonly windowDeltas: Int8Array;
  /** Node numbering: events 0..E-1, then gates. */
  readonly eventCount: number;
  readonly gateThreshold: Int32Array;
  readonly parentStart: Int32Array;
  readonly parents: Int32Array;
  readonly topNode: number;
  readonly warnings: readonly string[];
}

function testTimes(intervalHours: number, firstHours: number | undefined, missionHours: number): number[] {
  const times: number[] = [];
  const first = firstHours ?? intervalHours;
  for (let index = 0; ; index += 1) {
    const time = first + index * intervalHours;
    if (time >= missionHours) break;
    times.push(time);
  }
  return times;
}

interface Plan {
  readonly lambdaDU: number;
  readonly lambdaDD: number;
  readonly mttrHours: number;
  readonly proofTimes: number[];
  readonly partialTimes: number[];
  readonly proofCoverage: number;
  readonly partialCoverage: number;
}

function planOf(event: RateEvent, missionHours: number): Plan {
  return {
    lambdaDU: event.lambdaDU,
    lambdaDD: event.lambdaDD ?? 0,
    mttrHours: event.mttrHours ?? 0,
    proofTimes: event.proofTest ? testTimes(event.proofTest.intervalHours, event.proofTest.firstHours, missionHours) : [],
    partialTimes: event.partialTest ? testTimes(event.partialTest.intervalHours, event.partialTest.firstHours, missionHours) : [],
    proofCoverage: event.proofTest ? (event.proofTest.coverage ?? 1) : 0,
    partialCoverage: event.partialTest ? event.partialTest.coverage : 0,
  };
}

/**
 * The modes of one failure source (docs of the model file, "semantics"): DD revealed at once and repaired;
 * DU split into the share the partial test finds (found by partial and proof tests), the share only the
 * proof test finds, and the share hidden to the mission end; every mode independent of the others.
 */
function modesOf(plan: Plan, scaleDU: number, scaleDD: number, targets: Int32Array): SimulatedMode[] {
  const lambdaDU = plan.lambdaDU * scaleDU;
  const partialShare = plan.partialTimes.length > 0 ? plan.partialCoverage : 0;
  const proofShare = plan.proofTimes.length > 0 ? Math.max(plan.proofCoverage, partialShare) : partialShare;
  const sorted = (times: number[]) => Float64Array.from([...new Set(times)].sort((a, b) => a - b));
  const modes: SimulatedMode[] = [];
  const add = (rate: number, undetected: boolean, reveal: SimulatedMode['reveal'], revealTimes: Float64Array) => {
    if (rate > 0) modes.push({ rate, undetected, mttrHours: plan.mttrHours, reveal, revealTimes, targets });
  };
  // A detected failure restored at once (MTTR 0) is never failed for any length of time and is not a DU
  // failure, so it changes neither PFD(t) nor PFH.
  if (plan.mttrHours > 0) add(plan.lambdaDD * scaleDD, false, 'at-once', new Float64Array(0));
  add(lambdaDU * partialShare, true, 'tests', sorted([...plan.partialTimes, ...plan.proofTimes]));
  add(lambdaDU * (proofShare - partialShare), true, 'tests', sorted(plan.proofTimes));
  add(lambdaDU * (1 - proofShare), true, 'never', new Float64Array(0));
  return modes;
}

function geometricMean(values: number[]): number {
  if (values.some((value) => value === 0)) return 0;
  return Math.exp(values.reduce((sum, value) => sum + Math.log(value), 0) / values.length);
}

function votingFactor(model: FaultTreeModel, group: CommonCauseGroup, index: number): number {
  if (group.model !== 'pds') return 1;
  if (group.factor !== undefined) return group.factor;
  const members = new Set(group.members);
  const gate = model.gates.find((candidate) => candidate.inputs.length === members.size && candidate.inputs.every((input) => members.has(input)));
  if (!gate) {
    throw new ModelError([{ path: ['ccf', index, 'model'], message: `common-cause group "${group.id}" uses the PDS method but no gate has exactly its members as inputs; give "factor" (C_MooN)` }]);
  }
  const n = gate.inputs.length;
  const k = gate.type === 'or' ? 1 : gate.type === 'and' ? n : (gate.k ?? n);
  const factor = pdsFactor(n - k + 1, n);
  if (factor === undefined) {
    throw new ModelError([{ path: ['ccf', index, 'factor'], message: `common-cause group "${group.id}": the PDS table has no C_MooN for ${n - k + 1}oo${n}; give "factor"` }]);
  }
  return factor;
}

/**
 * Compiles a schema-checked fault tree for simulation, with the semantics of the model file: beta-factor
 * and PDS common cause as one shared event per group (geometric mean of the members' rates, the lowest
 * member coverage, the longest member MTTR, found by the earliest test of any member), test windows with
 * the event failed while tested, and each gate's failure threshold (or 1, and all, atLeast k).
 */
export function compileSimulation(model: FaultTreeModel): CompiledSimulation {
  const missionHours = model.mission.hours;
  const eventIndex = new Map(model.events.map((event, index) => [event.id, index]));
  const gateIndex = new Map(model.gates.map((gate, index) => [gate.id, index]));
  const eventCount = model.events.length;
  const groupOf = new Map<string, CommonCauseGroup>();
  for (const group of model.ccf ?? []) for (const member of group.members) groupOf.set(member, group);
  const warnings: string[] = [];
  const modes: SimulatedMode[] = [];
  const probabilities = new Float64Array(eventCount).fill(Number.NaN);
  const windows: { time: number; event: number; delta: number }[] = [];
  const plans = new Map<string, Plan>();

  model.events.forEach((event, index) => {
    if (isProbabilityEvent(event)) {
      probabilities[index] = event.probability;
      return;
    }
    const plan = planOf(event, missionHours);
    plans.set(event.id, plan);
    const group = groupOf.get(event.id);
    const beta = group?.beta ?? 0;
    const betaD = group ? (group.betaD ?? group.beta) : 0;
    modes.push(...modesOf(plan, 1 - beta, 1 - betaD, Int32Array.of(index)));
    const test = event.proofTest;
    const duration = test?.durationHours ?? 0;
    if (test && duration > 0 && (test.downDuringTest ?? true)) {
      for (const time of plan.proofTimes) {
        windows.push({ time, event: index, delta: 1 });
        windows.push({ time: Math.min(time + duration, missionHours), event: index, delta: -1 });
      }
    }
  });

  (model.ccf ?? []).forEach((group, index) => {
    const memberPlans = group.members.map((member) => plans.get(member)!);
    const factor = votingFactor(model, group, index);
    const differ = (values: number[]) => values.some((value) => value !== values[0]);
    const lambdaDUs = memberPlans.map((plan) => plan.lambdaDU);
    const lambdaDDs = memberPlans.map((plan) => plan.lambdaDD);
    if (differ(lambdaDUs) || differ(lambdaDDs)) warnings.push(`common-cause group "${group.id}": the members' rates differ; the shared event uses their geometric mean`);
    const lowest = (values: number[]) => (values.length === 0 ? 0 : Math.min(...values));
    const shared: Plan = {
      lambdaDU: group.beta * factor * geometricMean(lambdaDUs),
      lambdaDD: (group.betaD ?? group.beta) * factor * geometricMean(lambdaDDs),
      mttrHours: Math.max(...memberPlans.map((plan) => plan.mttrHours)),
      proofTimes: memberPlans.flatMap((plan) => plan.proofTimes),
      partialTimes: memberPlans.flatMap((plan) => plan.partialTimes),
      proofCoverage: lowest(memberPlans.filter((plan) => plan.proofTimes.length > 0).map((plan) => plan.proofCoverage)),
      partialCoverage: lowest(memberPlans.filter((plan) => plan.partialTimes.length > 0).map((plan) => plan.partialCoverage)),
    };
    modes.push(...modesOf(shared, 1, 1, Int32Array.from(group.members.map((member) => eventIndex.get(member)!))));
  });

  windows.sort((a, b) => a.time - b.time || a.delta - b.delta);
  const gateThreshold = Int32Array.from(model.gates, (gate) => (gate.type === 'or' ? 1 : gate.type === 'and' ? gate.inputs.length : gate.k!));
  const nodeOf = (id: string) => (eventIndex.has(id) ? eventIndex.get(id)! : eventCount + gateIndex.get(id)!);
  const parentLists: number[][] = Array.from({ length: eventCount + model.gates.length }, () => []);
  model.gates.forEach((gate, index) => {
    for (const input of gate.inputs) parentLists[nodeOf(input)].push(index);
  });
  const parentStart = new Int32Array(parentLists.length + 1);
  parentLists.forEach((list, node) => (parentStart[node + 1] = parentStart[node] + list.length));
  return {
    missionHours,
    modes,
    probabilities,
    windowTimes: Float64Array.from(windows, (window) => window.time),
    windowEvents: Int32Array.from(windows, (window) => window.event),
    windowDeltas: Int8Array.from(windows, (window) => window.delta),
    eventCount,
    gateThreshold,
    parentStart,
    parents: Int32Array.from(parentLists.flat()),
    topNode: nodeOf(model.top),
    warnings,
  };
}
