import type { FaultTreeModel } from '../../shared/model-file.js';
import { silReached } from '../../shared/sil.js';
import type { SolveResult } from '../../shared/solve-result.js';
import { throwIfAborted } from '../common/abort.js';
import { integrateAdaptive, kronrodOnPartition } from '../common/quadrature.js';
import { curveTimes } from '../common/time-grid.js';
import type { SolveOptions } from '../solve-options.js';
import { simplifiedValues } from '../formulas/match.js';
import { cutSetBounds } from './cut-set-bounds.js';
import { variableMatrix } from './evaluate.js';
import type { TreeVariables } from './variables.js';

/** Cut sets listed in a result, the most probable first. */
export const MAX_LISTED_CUT_SETS = 1000;

/**
 * The answer for a tree whose decision diagram is beyond the engine's budget: minimal cut sets built
 * through the gates with a probability cutoff (cut-set-bounds.ts), then at every time
 * max over sets of P(set) <= PFD(t) <= sum over sets of P(set) + dropped (union bound, Esary & Proschan
 * for the lower one). The reported PFDavg is the upper bound (conservative); both bounds are stated.
 */
export function solveByCutSets(model: FaultTreeModel, variables: TreeVariables, options: SolveOptions, solverVersion: string, reason: string): SolveResult {
  const progress = options.onProgress ?? (() => undefined);
  const mission = model.mission.hours;
  const rows = variables.rows;
  const rowOf = variables.rowOf;
  const points = new Set<number>([0, mission]);
  for (const row of rows) for (const time of row.breakpoints) if (time > 0 && time < mission) points.add(time);
  const edges = Float64Array.from([...points].sort((a, b) => a - b));

  progress(0.1, 'largest event unavailabilities');
  const probe = curveTimes(mission, 2000, edges);
  const probeQ = variableMatrix(rows, probe.hours, false, probe.fromLeft).q;
  const count = probe.hours.length;
  const maxQ = new Float64Array(rowOf.length);
  rowOf.forEach((row, variable) => {
    let max = 0;
    for (let j = 0; j < count; j++) max = Math.max(max, probeQ[row * count + j]);
    maxQ[variable] = max;
  });
  throwIfAborted(options.signal);

  progress(0.3, 'minimal cut sets with a cutoff');
  const bounds = cutSetBounds(model, variables, maxQ);
  const sets = bounds.sets;
  const sumAt = (times: Float64Array, fromLeft?: Uint8Array) => {
    const { q } = variableMatrix(rows, times, false, fromLeft);
    const n = times.length;
    const upper = new Float64Array(n);
    const lower = new Float64Array(n);
    for (const set of sets) {
      for (let j = 0; j < n; j++) {
        let product = 1;
        for (const variable of set) product *= q[rowOf[variable] * n + j];
        upper[j] += product;
        if (product > lower[j]) lower[j] = product;
      }
    }
    for (let j = 0; j < n; j++) upper[j] = Math.min(1, upper[j] + bounds.dropped);
    return { upper, lower, q };
  };

  progress(0.5, 'bounds of PFD(t) and PFDavg');
  const curve = curveTimes(mission, options.timePoints ?? 1000, edges);
  const curveValues = sumAt(curve.hours, curve.fromLeft).upper;
  const upperIntegral = integrateAdaptive(edges, (times) => sumAt(times).upper, { relativeTolerance: 1e-8, signal: options.signal });
  const rule = kronrodOnPartition(upperIntegral.partition);
  const atRule = sumAt(rule.times);
  const lowerAverage = rule.integrate(atRule.lower).integral / mission;
  const pfdAvg = upperIntegral.integral / mission;

  progress(0.7, 'cut set probabilities, frequency and importance');
  const { w } = variableMatrix(rows, rule.times, true);
  const n = rule.times.length;
  const setIntegrals = new Float64Array(sets.length);
  const containing = new Float64Array(rowOf.length);
  const others = new Float64Array(rowOf.length);
  let frequencyIntegral = 0;
  sets.forEach((set, index) => {
    for (let j = 0; j < n; j++) {
      let product = 1;
      for (const variable of set) product *= atRule.q[rowOf[variable] * n + j];
      const weight = rule.weights[j];
      setIntegrals[index] += weight * product;
      for (const variable of set) {
        let rest = 1;
        for (const other of set) if (other !== variable) rest *= atRule.q[rowOf[other] * n + j];
        others[variable] += weight * rest;
        containing[variable] += weight * product;
        frequencyIntegral += weight * rest * (w as Float64Array)[rowOf[variable] * n + j];
      }
    }
  });
  const rareSum = setIntegrals.reduce((sum, value) => sum + value, 0) / mission;
  const importance: SolveResult['importance'] = variables.variables.map((item, index) => {
    const withSet = containing[index] / mission;
    const birnbaum = others[index] / mission;
    return {
      id: item.id,
      kind: item.kind,
      birnbaum,
      fussellVesely: rareSum > 0 ? withSet / rareSum : 0,
      riskAchievementWorth: rareSum > 0 ? (rareSum - withSet + birnbaum) / rareSum : 0,
      riskReductionWorth: rareSum - withSet > 0 ? rareSum / (rareSum - withSet) : Number.MAX_VALUE,
      share: 0,
    };
  });
  const totalShare = importance.reduce((sum, item) => sum + item.fussellVesely, 0);
  for (const item of importance) item.share = totalShare > 0 ? item.fussellVesely / totalShare : 0;
  const listed = sets.map((set, index) => ({ set, integral: setIntegrals[index] })).sort((a, b) => b.integral - a.integral);
  const listedTotal = setIntegrals.reduce((sum, value) => sum + value, 0);
  const pfh = frequencyIntegral / mission;
  const demand = model.mission.demand;
  let pfdMax = 0;
  for (const value of curveValues) pfdMax = Math.max(pfdMax, value);
  progress(1, 'done');
  return {
    method: 'fault-tree',
    algorithm: `minimal cut sets with cutoff ${bounds.cutoff.toExponential(0)} and order <= ${bounds.maxOrder} (${sets.length} sets), union bound; ${reason}`,
    solverVersion,
    demand,
    missionHours: mission,
    pfdAvg,
    pfdMax,
    pfh,
    rrf: pfdAvg > 0 ? 1 / pfdAvg : Number.MAX_VALUE,
    sil: silReached(demand === 'low' ? pfdAvg : pfh, demand),
    curve: { hours: Array.from(curve.hours), pfd: Array.from(curveValues) },
    simplified: simplifiedValues(model, { pfdAvg, pfh }),
    cutSets: listed.slice(0, MAX_LISTED_CUT_SETS).map(({ set, integral }) => ({
      events: Array.from(set, (variable) => variables.variables[variable].id),
      order: set.length,
      probability: integral / mission,
      share: listedTotal > 0 ? integral / listedTotal : 0,
    })),
    importance,
    warnings: [
      ...variables.warnings,
      `not exact: ${reason}; PFDavg is an upper bound: ${lowerAverage.toExponential(3)} <= PFDavg <= ${pfdAvg.toExponential(3)} (the dropped cut sets add at most ${bounds.dropped.toExponential(1)})`,
      'PFH is the sum of the cut sets\' failure frequencies (an upper bound); importance measures are from the cut sets (rare-event form); gate importance is not computed',
    ],
    errorBound: pfdAvg > 0 ? (pfdAvg - lowerAverage) / pfdAvg : 0,
  };
}
