import { isProbabilityEvent, type CommonCauseGroup, type FaultTreeModel, type RateEvent } from '../../shared/model-file.js';
import type { SolveResult } from '../../shared/solve-result.js';
import { annexBPfdAvg, annexBPfh, imperfectTestPfdAvg, type AnnexBArchitecture, type ChannelParameters } from './annex-b.js';
import { pdsFactor, pdsPfdAvg } from './pds.js';

type SimplifiedValue = SolveResult['simplified'][number];

/** Exact measures of the whole function, for the deviation of the simplified value. */
export interface ExactMeasures {
  readonly pfdAvg: number;
  readonly pfh: number;
}

interface Channels {
  readonly events: RateEvent[];
  readonly group: CommonCauseGroup | undefined;
}

const ANNEX_B_BY_VOTING: Record<string, AnnexBArchitecture> = { '1oo1': '1oo1', '1oo2': '1oo2', '2oo2': '2oo2', '2oo3': '2oo3', '1oo3': '1oo3' };

/** The rate events feeding a gate and their common-cause group, when the gate is a plain voted group. */
function channelsOf(model: FaultTreeModel, inputs: readonly string[]): Channels | undefined {
  const events: RateEvent[] = [];
  for (const input of inputs) {
    const event = model.events.find((candidate) => candidate.id === input);
    if (!event || isProbabilityEvent(event)) return undefined;
    events.push(event);
  }
  const groups = (model.ccf ?? []).filter((group) => group.members.some((member) => inputs.includes(member)));
  if (groups.length > 1) return undefined;
  const group = groups[0];
  if (group && (group.members.length !== inputs.length || !group.members.every((member) => inputs.includes(member)))) return undefined;
  return { events, group };
}

function sameValues(values: (number | undefined)[]): boolean {
  return values.every((value) => value === values[0]);
}

/**
 * Simplified values (IEC 61508-6:2010 Annex B, the PDS method, the partial/imperfect test approximation)
 * for the whole function and each gate that is a standard architecture of identical rate events, with
 * the deviation of the exact value for the whole function: (exact - simplified) / simplified.
 */
export function simplifiedValues(model: FaultTreeModel, exact: ExactMeasures): SimplifiedValue[] {
  const values: SimplifiedValue[] = [];
  const demandMeasure = model.mission.demand === 'low' ? 'pfdAvg' : 'pfh';
  const consider = (scope: string, isTop: boolean, inputs: readonly string[], k: number) => {
    const channels = channelsOf(model, inputs);
    if (!channels) return;
    const n = inputs.length;
    const m = n - k + 1;
    const voting = `${m}oo${n}`;
    const first = channels.events[0];
    const warnings: string[] = [];
    const differing = ['lambdaDU', 'lambdaDD', 'mttrHours'] as const;
    for (const key of differing) {
      if (!sameValues(channels.events.map((event) => event[key] ?? 0))) warnings.push(`channels differ in ${key}; the first channel's value is used`);
    }
    const intervals = channels.events.map((event) => event.proofTest?.intervalHours);
    if (!sameValues(intervals)) warnings.push('channels have different proof test intervals; the first channel\'s is used');
    const firsts = channels.events.map((event) => event.proofTest?.firstHours ?? event.proofTest?.intervalHours);
    if (!sameValues(firsts)) warnings.push('the channels are tested at different times (staggered); the formula assumes they are tested together');
    const proofTestIntervalHours = first.proofTest?.intervalHours ?? model.mission.hours;
    if (!first.proofTest) warnings.push('no proof test: T1 is taken as the mission time');
    if ((first.proofTest?.durationHours ?? 0) > 0) warnings.push('the formula leaves out the time out of service for testing');
    const hasPartial = channels.events.some((event) => event.partialTest);
    const imperfect = channels.events.some((event) => (event.proofTest?.coverage ?? 1) < 1);
    const lambdaDU = first.lambdaDU;
    const lambdaDD = first.lambdaDD ?? 0;
    if ((lambdaDU + lambdaDD) * proofTestIntervalHours > 0.1) warnings.push(`lambda T1 = ${((lambdaDU + lambdaDD) * proofTestIntervalHours).toPrecision(2)} is not small: outside the formulas' domain (lambda T1 << 1)`);
    const group = channels.group;
    const parameters: ChannelParameters = {
      lambdaDU,
      lambdaDD,
      beta: group?.beta ?? 0,
      betaD: group ? (group.betaD ?? group.beta) : 0,
      proofTestIntervalHours,
      mttrHours: first.mttrHours ?? 0,
    };
    const deviation = (simplified: number | null, measure: 'pfdAvg' | 'pfh') =>
      isTop && measure === demandMeasure && simplified !== null && simplified > 0 ? (exact[measure] - simplified) / simplified : null;
    const annex = ANNEX_B_BY_VOTING[voting];
    if (n === 1 && (hasPartial || imperfect)) {
      const pfdAvg = imperfectTestPfdAvg({
        lambdaDU,
        lambdaDD,
        mttrHours: first.mttrHours ?? 0,
        proofTestIntervalHours,
        proofTestCoverage: first.proofTest ? (first.proofTest.coverage ?? 1) : 0,
        partialTestIntervalHours: first.partialTest?.intervalHours,
        partialTestCoverage: first.partialTest?.coverage,
        missionHours: model.mission.hours,
      });
      values.push({ scope, formula: 'partial and imperfect proof test approximation, 1oo1 (common practice)', pfdAvg, pfh: null, deviation: deviation(pfdAvg, 'pfdAvg'), warnings });
      return;
    }
    if (hasPartial) warnings.push('partial tests are left out of the formula');
    if (imperfect) warnings.push('proof test coverage below 1 is left out of the formula');
    if (annex && !(group?.model === 'pds')) {
      const pfdAvg = annexBPfdAvg(annex, parameters);
      const pfh = annexBPfh(annex, parameters);
      const both = deviation(demandMeasure === 'pfdAvg' ? pfdAvg : pfh, demandMeasure);
      values.push({ scope, formula: `IEC 61508-6:2010 Annex B, ${annex} (B.3.2.2 low demand, B.3.3.2 high demand)`, pfdAvg, pfh, deviation: both, warnings });
      return;
    }
    if (m === n && group) return;
    const factor = group?.factor ?? pdsFactor(m, n);
    if (group && factor === undefined) return;
    const pfdAvg = pdsPfdAvg({ m, n, lambdaDU, beta: group?.beta ?? 0, factor, proofTestIntervalHours });
    values.push({
      scope,
      formula: `PDS method, general ${voting} approximation with C_${voting} = ${factor ?? 'n/a'} (PDS method handbook 2013)`,
      pfdAvg,
      pfh: null,
      deviation: deviation(pfdAvg, 'pfdAvg'),
      warnings: [...warnings, 'the PDS approximation leaves out repair time and detected failures'],
    });
  };

  const topEvent = model.events.find((event) => event.id === model.top);
  if (topEvent) consider(`whole function (${model.top}): 1oo1`, true, [model.top], 1);
  for (const gate of model.gates) {
    const n = gate.inputs.length;
    const k = gate.type === 'or' ? 1 : gate.type === 'and' ? n : (gate.k ?? n);
    const voting = `${n - k + 1}oo${n}`;
    const isTop = gate.id === model.top;
    consider(isTop ? `whole function (${gate.id}): ${voting}` : `${gate.id}: ${voting}`, isTop, gate.inputs, k);
  }
  return values;
}
