import { isProbabilityEvent, type CommonCauseGroup, type FaultTreeModel, type RateEvent } from '../../shared/model-file.js';
import { ModelError, type ModelIssue } from '../common/model-error.js';
import { compileEventTimeline, type EventTimeline, type EventTimelineSpec, type RevealedModeSpec } from '../events/event-timeline.js';
import { pdsFactor } from '../formulas/pds.js';

/** A variable of the decision diagram: an event's independent part or a common-cause group's shared event. */
export interface TreeVariable {
  readonly id: string;
  readonly kind: 'event' | 'ccf';
  readonly timeline: EventTimeline;
}

export interface TreeVariables {
  readonly variables: readonly TreeVariable[];
  /** The distinct timelines (events with the same rates and test plan share one). */
  readonly rows: readonly EventTimeline[];
  /** Index into rows of each variable's timeline. */
  readonly rowOf: Int32Array;
  /** Variable index of each event's independent part. */
  readonly eventVariable: ReadonlyMap<string, number>;
  /** Variable index of the shared event of the group each event belongs to, if any. */
  readonly sharedVariable: ReadonlyMap<string, number>;
  readonly warnings: readonly string[];
}

/** Test times first, first + interval, ... strictly before the mission end. */
export function testTimes(intervalHours: number, firstHours: number | undefined, missionHours: number): number[] {
  const times: number[] = [];
  const first = firstHours ?? intervalHours;
  for (let index = 0; ; index++) {
    const time = first + index * intervalHours;
    if (time >= missionHours) break;
    times.push(time);
  }
  return times;
}

interface EventPlan {
  readonly lambdaDU: number;
  readonly lambdaDD: number;
  readonly mttrHours: number;
  readonly proofTimes: number[];
  readonly partialTimes: number[];
  readonly proofCoverage: number;
  readonly partialCoverage: number;
  readonly downWindows: [number, number][];
}

/** The defaults of docs/model-format.md applied to one rate event. */
export function eventPlan(event: RateEvent, missionHours: number): EventPlan {
  const proof = event.proofTest;
  const partial = event.partialTest;
  const proofTimes = proof ? testTimes(proof.intervalHours, proof.firstHours, missionHours) : [];
  const partialTimes = partial ? testTimes(partial.intervalHours, partial.firstHours, missionHours) : [];
  const duration = proof?.durationHours ?? 0;
  const downWindows: [number, number][] =
    proof && duration > 0 && (proof.downDuringTest ?? true) ? proofTimes.map((time) => [time, Math.min(time + duration, missionHours)]) : [];
  return {
    lambdaDU: event.lambdaDU,
    lambdaDD: event.lambdaDD ?? 0,
    mttrHours: event.mttrHours ?? 0,
    proofTimes,
    partialTimes,
    proofCoverage: proof ? (proof.coverage ?? 1) : 0,
    partialCoverage: partial ? partial.coverage : 0,
    downWindows,
  };
}

/**
 * Splits DU failures into the groups found by the partial test (and by the proof test), found only by the
 * proof test, and never found before the mission ends.
 */
function timelineSpec(plan: EventPlan, scaleDU: number, scaleDD: number, withWindows: boolean): EventTimelineSpec {
  const lambdaDU = plan.lambdaDU * scaleDU;
  const revealed: RevealedModeSpec[] = [];
  const partialShare = plan.partialTimes.length > 0 ? plan.partialCoverage : 0;
  const proofShare = plan.proofTimes.length > 0 ? Math.max(plan.proofCoverage, partialShare) : partialShare;
  if (partialShare > 0) revealed.push({ lambda: lambdaDU * partialShare, revealTimes: [...plan.partialTimes, ...plan.proofTimes] });
  if (proofShare > partialShare) revealed.push({ lambda: lambdaDU * (proofShare - partialShare), revealTimes: plan.proofTimes });
  return {
    lambdaDD: plan.lambdaDD * scaleDD,
    mttrHours: plan.mttrHours,
    revealed,
    lambdaNeverRevealed: lambdaDU * (1 - proofShare),
    downWindows: withWindows ? plan.downWindows : [],
  };
}

function lowestOf(values: number[]): number {
  return values.length === 0 ? 0 : Math.min(...values);
}

function geometricMean(values: number[]): number {
  if (values.some((value) => value === 0)) return 0;
  return Math.exp(values.reduce((sum, value) => sum + Math.log(value), 0) / values.length);
}

/** The voting of the gate whose inputs are exactly the group's members: k failures needed of n. */
function votingOfMembers(model: FaultTreeModel, group: CommonCauseGroup): { k: number; n: number; gateId: string } | undefined {
  const members = new Set(group.members);
  for (const gate of model.gates) {
    if (gate.inputs.length !== members.size || !gate.inputs.every((input) => members.has(input))) continue;
    const n = gate.inputs.length;
    const k = gate.type === 'or' ? 1 : gate.type === 'and' ? n : (gate.k ?? n);
    return { k, n, gateId: gate.id };
  }
  return undefined;
}

/**
 * Compiles every event and common-cause group of a (schema-checked) fault tree into diagram variables.
 * Beta-factor model (IEC 61508-6:2010 Annex D; Rausand & Hoyland section 10.4): each member keeps
 * (1 - beta) lambdaDU and (1 - betaD) lambdaDD; one shared event with beta lambdaDU and betaD lambdaDD
 * (geometric mean over the members) fails them all. PDS method (SINTEF PDS method handbook, 2013
 * edition, section 4): the shared rate is multiplied by C_MooN.
 */
export function compileVariables(model: FaultTreeModel): TreeVariables {
  const missionHours = model.mission.hours;
  const issues: ModelIssue[] = [];
  const warnings: string[] = [];
  const groupOf = new Map<string, { group: CommonCauseGroup; index: number }>();
  (model.ccf ?? []).forEach((group, index) => group.members.forEach((member) => groupOf.set(member, { group, index })));
  const variables: TreeVariable[] = [];
  const eventVariable = new Map<string, number>();
  const sharedVariable = new Map<string, number>();
  const plans = new Map<string, EventPlan>();
  const rows: EventTimeline[] = [];
  const rowKeys = new Map<string, number>();
  const rowOf: number[] = [];
  const compiled = (spec: EventTimelineSpec): EventTimeline => {
    const key = JSON.stringify(spec);
    let row = rowKeys.get(key);
    if (row === undefined) {
      row = rows.length;
      rows.push(compileEventTimeline(spec));
      rowKeys.set(key, row);
    }
    rowOf.push(row);
    return rows[row];
  };

  model.events.forEach((event) => {
    eventVariable.set(event.id, variables.length);
    if (isProbabilityEvent(event)) {
      variables.push({ id: event.id, kind: 'event', timeline: compiled({ probability: event.probability, lambdaDD: 0, mttrHours: 0, revealed: [], lambdaNeverRevealed: 0, downWindows: [] }) });
      return;
    }
    const plan = eventPlan(event, missionHours);
    plans.set(event.id, plan);
    const membership = groupOf.get(event.id);
    const beta = membership?.group.beta ?? 0;
    const betaD = membership ? (membership.group.betaD ?? membership.group.beta) : 0;
    variables.push({ id: event.id, kind: 'event', timeline: compiled(timelineSpec(plan, 1 - beta, 1 - betaD, true)) });
  });

  (model.ccf ?? []).forEach((group, index) => {
    const memberPlans = group.members.map((member) => plans.get(member)).filter((plan): plan is EventPlan => plan !== undefined);
    if (memberPlans.length !== group.members.length) return;
    let factor = 1;
    if (group.model === 'pds') {
      if (group.factor !== undefined) {
        factor = group.factor;
      } else {
        const voting = votingOfMembers(model, group);
        const looked = voting ? pdsFactor(voting.n - voting.k + 1, voting.n) : undefined;
        if (!voting) {
          issues.push({ path: ['ccf', index, 'model'], message: `common-cause group "${group.id}" uses the PDS method but no gate has exactly its members as inputs; give "factor" (C_MooN)` });
          return;
        }
        if (looked === undefined) {
          issues.push({ path: ['ccf', index, 'factor'], message: `common-cause group "${group.id}": the PDS table has no C_MooN for ${voting.n - voting.k + 1}oo${voting.n} (gate "${voting.gateId}"); give "factor"` });
          return;
        }
        factor = looked;
      }
    }
    const lambdaDUs = memberPlans.map((plan) => plan.lambdaDU);
    const lambdaDDs = memberPlans.map((plan) => plan.lambdaDD);
    const differ = (values: number[]) => values.some((value) => value !== values[0]);
    if (differ(lambdaDUs) || differ(lambdaDDs)) {
      warnings.push(`common-cause group "${group.id}": the members' rates differ; the shared event uses their geometric mean`);
    }
    const proofCoverages = memberPlans.map((plan) => plan.proofCoverage);
    const partialCoverages = memberPlans.map((plan) => plan.partialCoverage);
    const mttrs = memberPlans.map((plan) => plan.mttrHours);
    if (differ(proofCoverages) || differ(partialCoverages) || differ(mttrs)) {
      warnings.push(`common-cause group "${group.id}": the members' test coverages or MTTR differ; the shared event takes the lowest coverage and the longest MTTR`);
    }
    const betaD = group.betaD ?? group.beta;
    const shared: EventPlan = {
      lambdaDU: group.beta * factor * geometricMean(lambdaDUs),
      lambdaDD: betaD * factor * geometricMean(lambdaDDs),
      mttrHours: Math.max(...mttrs),
      proofTimes: memberPlans.flatMap((plan) => plan.proofTimes),
      partialTimes: memberPlans.flatMap((plan) => plan.partialTimes),
      proofCoverage: lowestOf(memberPlans.filter((plan) => plan.proofTimes.length > 0).map((plan) => plan.proofCoverage)),
      partialCoverage: lowestOf(memberPlans.filter((plan) => plan.partialTimes.length > 0).map((plan) => plan.partialCoverage)),
      downWindows: [],
    };
    const variableIndex = variables.length;
    variables.push({ id: group.id, kind: 'ccf', timeline: compiled(timelineSpec(shared, 1, 1, false)) });
    for (const member of group.members) sharedVariable.set(member, variableIndex);
  });
  if (issues.length > 0) throw new ModelError(issues);
  return { variables, rows, rowOf: Int32Array.from(rowOf), eventVariable, sharedVariable, warnings };
}
