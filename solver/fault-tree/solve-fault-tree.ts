import type { FaultTreeModel } from '../../shared/model-file.js';
import { silReached } from '../../shared/sil.js';
import type { SolveResult } from '../../shared/solve-result.js';
import { throwIfAborted } from '../common/abort.js';
import type { SolveOptions } from '../solve-options.js';
import { simplifiedValues } from '../formulas/match.js';
import { BddNodeLimitError } from './bdd.js';
import { FaultTreeEngine, STATED_ERROR_BOUND } from './engine.js';
import { POINTS_PER_INTERVAL } from '../common/quadrature.js';
import { MAX_LISTED_CUT_SETS, solveByCutSets } from './solve-by-cut-sets.js';
import { compileVariables } from './variables.js';

/**
 * Gates that are modules get their importance from the backward pass at no extra cost; every other gate
 * costs a forward pass over the nodes of its module rebuilt with the gate failed and working. Those are
 * computed while their nodes times the quadrature times stay under this (about 0.2 s at 2.75e8 node
 * evaluations per second; the issue's reference rate of a plain typed-array pass).
 */
export const GATE_IMPORTANCE_BUDGET = 6e7;

/** Cut sets whose product of mean unavailabilities is below this share of PFDavg are not listed. */
export const CUT_SET_CUTOFF = 1e-8;
/** Most minimal cut sets listed from the diagram; beyond, the cutoff is raised tenfold until they fit. */
export const MAX_CUT_SETS = 50_000;
/** Most cut sets whose time-averaged probability is integrated. */
export const CUT_SETS_INTEGRATED = 2000;

/** Largest decision diagram built; beyond it the cut-set answer with bounds is given instead. */
export const DIAGRAM_NODE_LIMIT = 500_000;
/** Node evaluations allowed for the exact answer (about 10 s at 3e8 per second); beyond, the cut-set answer. */
export const DIAGRAM_WORK_LIMIT = 3e9;

export interface FaultTreeSolveOptions extends SolveOptions {
  /** Node budget of the decision diagram. Default DIAGRAM_NODE_LIMIT. */
  readonly nodeLimit?: number;
  /** Budget of node evaluations. Default DIAGRAM_WORK_LIMIT. */
  readonly workLimit?: number;
}

/** Mean of a piecewise linear curve over its span (repeated times, a curve's jumps, add nothing). */
function trapezoidMean(hours: Float64Array, values: Float64Array): number {
  let integral = 0;
  for (let i = 0; i + 1 < hours.length; i++) integral += ((hours[i + 1] - hours[i]) * (values[i] + values[i + 1])) / 2;
  const span = hours[hours.length - 1] - hours[0];
  return span > 0 ? integral / span : values[0];
}

/**
 * Solves a fault tree exactly: per-event q(t) under each event's test plan, the top event from one
 * decision diagram at every time point, PFDavg and PFH as adaptive integrals between breakpoints, minimal
 * cut sets, importance measures and the simplified formulas beside the exact values.
 */
export function solveFaultTree(model: FaultTreeModel, options: FaultTreeSolveOptions, solverVersion: string): SolveResult {
  const progress = options.onProgress ?? (() => undefined);
  const signal = options.signal;
  progress(0, 'building the decision diagram');
  const compiled = compileVariables(model);
  let engine: FaultTreeEngine;
  try {
    engine = new FaultTreeEngine(model, { signal, nodeLimit: options.nodeLimit ?? DIAGRAM_NODE_LIMIT, variables: compiled });
  } catch (error) {
    if (!(error instanceof BddNodeLimitError)) throw error;
    return solveByCutSets(model, compiled, options, solverVersion, `the decision diagram needs more than ${error.limit.toLocaleString('en-US')} nodes`);
  }
  const timePoints = options.timePoints ?? 1000;
  const work = engine.expectedWork(timePoints);
  if (work > (options.workLimit ?? DIAGRAM_WORK_LIMIT)) {
    return solveByCutSets(model, compiled, options, solverVersion, `the decision diagram has ${engine.nodeCount.toLocaleString('en-US')} nodes, about ${work.toExponential(1)} node evaluations`);
  }
  const warnings = [...engine.variables.warnings];
  throwIfAborted(signal);

  progress(0.15, 'computing PFD(t) and the failure frequency w(t)');
  const curve = engine.curve(timePoints, true);
  let pfdMax = 0;
  for (const value of curve.pfd) pfdMax = Math.max(pfdMax, value);

  progress(0.35, 'listing minimal cut sets');
  // The cut-set cutoff needs a PFDavg before the exact one: the curve's trapezoid mean is close enough for
  // a listing threshold, and lets the quadrature times be evaluated once for PFDavg, PFH and importance.
  const curveMean = trapezoidMean(curve.hours, curve.pfd);
  const means = engine.meanUnavailability();
  const requestedCutoff = Math.max(1e-300, CUT_SET_CUTOFF * curveMean);
  const enumerated = engine.cutSets(means, { cutoff: requestedCutoff, maxSets: MAX_CUT_SETS });
  if (!enumerated.complete) {
    warnings.push('minimal cut sets not listed: their zero-suppressed decision diagram needs more than 2,000,000 nodes');
  } else if (enumerated.truncated) {
    warnings.push(
      `minimal cut sets (from the decision diagram) above order ${enumerated.maxOrder} or with a product of mean unavailabilities below ${enumerated.cutoff.toExponential(1)} are not listed${enumerated.cutoff > requestedCutoff ? ` (the cutoff was raised from ${requestedCutoff.toExponential(1)} to keep the list under ${MAX_CUT_SETS.toLocaleString('en-US')} sets)` : ''}; PFDavg, PFH and importance are exact and do not depend on the list`,
    );
  }
  const ranked = enumerated.sets
    .map((set) => ({ set, product: set.reduce((product, variable) => product * means[variable], 1) }))
    .sort((a, b) => b.product - a.product);
  if (ranked.length > CUT_SETS_INTEGRATED) warnings.push(`${ranked.length} minimal cut sets found; the ${CUT_SETS_INTEGRATED} with the largest mean products are integrated`);
  const cutSets = { sets: ranked.slice(0, CUT_SETS_INTEGRATED).map((item) => item.set) };
  const cutSetIntegrals = new Float64Array(cutSets.sets.length);
  const rowOf = engine.variables.rowOf;
  const cutSetRows = cutSets.sets.map((set) => Int32Array.from(set, (variable) => rowOf[variable]));

  progress(0.45, 'rebuilding the diagrams of gates that are not modules');
  const startingTimes = POINTS_PER_INTERVAL * (engine.quadratureEdges.length - 1);
  const gateIds = model.gates.map((gate) => gate.id);
  const budgetNodes = Math.floor(GATE_IMPORTANCE_BUDGET / startingTimes);
  const fixedGates = engine.fixedGates(gateIds, budgetNodes) ?? [];
  if (fixedGates.length === 0 && gateIds.some((id) => engine.tree.gatePlace.get(id)?.isModule === false)) {
    const others = gateIds.filter((id) => engine.tree.gatePlace.get(id)?.isModule === false).length;
    warnings.push(
      `importance of the ${others} gates that are not modules (their inputs share events with the rest of the tree) not computed: their modules rebuilt with each gate fixed need more than ${budgetNodes.toLocaleString('en-US')} nodes, beyond the budget of ${GATE_IMPORTANCE_BUDGET.toExponential(0)} node evaluations at ${startingTimes.toLocaleString('en-US')} quadrature times; the ${gateIds.length - others} gates that are modules have theirs`,
    );
  }

  progress(0.5, 'integrating PFDavg, PFH and importance');
  const frequency = engine.averages((q, count, weights, start) => {
    if (start === 0) cutSetIntegrals.fill(0);
    for (let index = 0; index < cutSetRows.length; index++) {
      const rows = Int32Array.from(cutSetRows[index], (row) => row * count);
      let sum = 0;
      for (let j = 0; j < count; j++) {
        let product = weights[j];
        for (let m = 0; m < rows.length; m++) product *= q[rows[m] + j];
        sum += product;
      }
      cutSetIntegrals[index] += sum;
    }
  }, fixedGates);
  const average = { pfdAvg: frequency.pfdAvg, relativeError: frequency.pfdRelativeError, partition: frequency.partition };
  if (average.relativeError > STATED_ERROR_BOUND) {
    warnings.push(`the PFDavg integral reached a relative error estimate of ${average.relativeError.toExponential(1)} only`);
  }
  let pfh = frequency.pfh;
  let pfhError = frequency.relativeError;
  if (pfhError > STATED_ERROR_BOUND) {
    const adaptive = engine.pfhAdaptive();
    pfh = adaptive.pfh;
    pfhError = adaptive.relativeError;
    if (pfhError > STATED_ERROR_BOUND) warnings.push(`the PFH integral reached a relative error estimate of ${pfhError.toExponential(1)} only`);
  }

  const mission = model.mission.hours;
  const pfdAvg = average.pfdAvg;
  const variables = engine.variables.variables;
  const basicImportance = variables.map((item, index) => {
    const birnbaum = frequency.averages.birnbaum[index] / mission;
    const reduction = frequency.averages.qTimesBirnbaum[index] / mission;
    const withFailed = pfdAvg + birnbaum - reduction;
    const withWorking = pfdAvg - reduction;
    return {
      id: item.id,
      kind: item.kind,
      birnbaum,
      fussellVesely: pfdAvg > 0 ? reduction / pfdAvg : 0,
      riskAchievementWorth: pfdAvg > 0 ? withFailed / pfdAvg : 0,
      riskReductionWorth: withWorking > 0 ? pfdAvg / withWorking : Number.MAX_VALUE,
      share: 0,
    };
  });
  const totalReduction = basicImportance.reduce((sum, item) => sum + item.fussellVesely, 0);
  for (const item of basicImportance) item.share = totalReduction > 0 ? item.fussellVesely / totalReduction : 0;

  progress(0.8, 'gate importance');
  const gateImportance: SolveResult['importance'] = [];
  const gateAverages = engine.gateAverages(frequency, fixedGates, gateIds);
  model.gates.forEach((gate, index) => {
    const averages = gateAverages[index];
    if (!averages) return;
    const { failed: withFailed, working: withWorking } = averages;
    gateImportance.push({
      id: gate.id,
      kind: 'gate',
      birnbaum: withFailed - withWorking,
      fussellVesely: pfdAvg > 0 ? (pfdAvg - withWorking) / pfdAvg : 0,
      riskAchievementWorth: pfdAvg > 0 ? withFailed / pfdAvg : 0,
      riskReductionWorth: withWorking > 0 ? pfdAvg / withWorking : Number.MAX_VALUE,
      share: pfdAvg > 0 ? (pfdAvg - withWorking) / pfdAvg : 0,
    });
  });

  const cutSetTotal = cutSetIntegrals.reduce((sum, value) => sum + value, 0);
  const listed = cutSets.sets
    .map((set, index) => ({ set, integral: cutSetIntegrals[index] }))
    .sort((a, b) => b.integral - a.integral);
  if (listed.length > MAX_LISTED_CUT_SETS) warnings.push(`${listed.length} minimal cut sets found; the ${MAX_LISTED_CUT_SETS} most probable are listed`);

  progress(0.9, 'simplified formulas');
  const simplified = simplifiedValues(model, { pfdAvg, pfh });
  const demand = model.mission.demand;
  if (demand !== 'low') {
    warnings.push('PFH counts DU failures (DD failures are taken to the safe state by diagnostics); time out of service for tests is not counted as a dangerous failure');
  }
  if (pfdAvg === 0) warnings.push('PFDavg is 0: the risk reduction factor is unbounded');
  progress(1, 'done');
  return {
    method: 'fault-tree',
    algorithm: `BDD, ${engine.nodeCount} nodes in ${engine.tree.modules.length} modules over ${variables.length} variables (${engine.diagram.compositeForms.length} OR modules of events evaluated as one sum of exponentials each); adaptive Gauss-Kronrod (7/15) on ${average.partition.length - 1} intervals between ${engine.edges.length - 1} breakpoint segments`,
    solverVersion,
    demand,
    missionHours: mission,
    pfdAvg,
    pfdMax,
    pfh,
    rrf: pfdAvg > 0 ? 1 / pfdAvg : Number.MAX_VALUE,
    sil: silReached(demand === 'low' ? pfdAvg : pfh, demand),
    curve: { hours: Array.from(curve.hours), pfd: Array.from(curve.pfd), frequency: Array.from(curve.frequency ?? []) },
    simplified,
    cutSets: listed.slice(0, MAX_LISTED_CUT_SETS).map(({ set, integral }) => ({
      events: Array.from(set, (variable) => variables[variable].id),
      order: set.length,
      probability: integral / mission,
      share: cutSetTotal > 0 ? integral / cutSetTotal : 0,
    })),
    importance: [...basicImportance, ...gateImportance],
    warnings,
    errorBound: average.relativeError,
  };
}
