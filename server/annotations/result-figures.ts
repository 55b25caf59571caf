import type { ResultFigure } from '../../shared/api/annotations.js';
import type { ModelFile } from '../../shared/model-file.js';
import { silReached } from '../../shared/sil.js';
import type { SolveResult } from '../../shared/solve-result.js';
import { architecturalConstraints, silClaim, spuriousTripRate } from '../../solver/analysis/index.js';

/** One value of a figure: a number as the page shows it (3 significant digits), a word, or rows of them. */
type Cell = number | string | null;
export type FigureValues = Record<string, Cell | Cell[][]>;

/**
 * What a result-figure thread keeps of its figure when it is written: the revision's content hash, the solve
 * looked at, and the figure's values. A later revision compares against it to mark the thread outdated.
 */
export interface FigureSnapshot {
  readonly figure: ResultFigure;
  readonly contentHash: string;
  readonly solveId: string | null;
  readonly method: 'exact' | 'montecarlo' | null;
  /** Null when the figure needs a result and the revision had no succeeded solve yet. */
  readonly values: FigureValues | null;
}

/**
 * Where a figure's values come from: the solve's result, or the model file alone (the architectural
 * constraints, the spurious trip rate and the sensitivity are computed from the model, not from a solve).
 */
export const FIGURE_SOURCE: Readonly<Record<ResultFigure, 'result' | 'model'>> = {
  verdict: 'result',
  'pfd-curve': 'result',
  'weakest-link': 'result',
  importance: 'result',
  'cut-sets': 'result',
  constraints: 'model',
  'spurious-trips': 'model',
  sensitivity: 'model',
};

/** The results page rounds measures to 3 significant digits; a change below that is not a change of the figure. */
function shown(value: number | null): Cell {
  if (value === null) return null;
  if (!Number.isFinite(value)) return value > 0 ? 'infinite' : 'not a number';
  return Number(value.toPrecision(3));
}

/** The longest list of cut sets a thread keeps (ranked as the solver lists them); a longer tail is counted. */
const CUT_SETS_KEPT = 50;
/** As many items as the weakest-link chart draws. */
const WEAKEST_LINK_BARS = 12;

/**
 * The values that make up a figure, as the results page shows them:
 * - verdict: PFDavg, PFH, RRF, the SIL band of the measure and the SIL claim (all limits);
 * - pfd-curve: the mission, PFDavg, PFDmax and PFH (the curve's points depend on the time grid asked for,
 *   so its headline figures stand for it);
 * - weakest-link: the 12 largest shares of PFDavg; importance: every item's four measures;
 * - cut-sets: the first 50 cut sets with their probabilities, and how many there are;
 * - constraints: each subsystem's HFT, SFF, type and the SIL each rule set allows (from the model file);
 * - spurious-trips: the function's and each subsystem's trip rate (from the model file);
 * - sensitivity: the model content itself, which the client's sensitivity runs vary (any change changes it).
 * Null when the figure needs a result and there is none.
 */
export function figureValues(figure: ResultFigure, model: ModelFile, contentHash: string, result: SolveResult | null): FigureValues | null {
  if (FIGURE_SOURCE[figure] === 'result' && result === null) return null;
  switch (figure) {
    case 'verdict': {
      const measure = result!.demand === 'low' ? result!.pfdAvg : result!.pfh;
      const constraints = model.kind === 'fault-tree' ? architecturalConstraints(model) : null;
      const claim = silClaim({ probabilitySil: silReached(measure, result!.demand), demand: result!.demand, measureText: '', constraints });
      return { PFDavg: shown(result!.pfdAvg), PFH: shown(result!.pfh), RRF: shown(result!.rrf), 'SIL band': result!.sil, 'SIL claim': claim.sil };
    }
    case 'pfd-curve':
      return { 'mission hours': shown(result!.missionHours), PFDavg: shown(result!.pfdAvg), PFDmax: shown(result!.pfdMax), PFH: shown(result!.pfh) };
    case 'weakest-link':
      return {
        shares: [...result!.importance]
          .sort((a, b) => b.share - a.share || a.id.localeCompare(b.id))
          .slice(0, WEAKEST_LINK_BARS)
          .map((item) => [`${item.kind} ${item.id}`, shown(item.share)]),
      };
    case 'importance':
      return {
        measures: [...result!.importance]
          .sort((a, b) => a.id.localeCompare(b.id) || a.kind.localeCompare(b.kind))
          .map((item) => [`${item.kind} ${item.id}`, shown(item.birnbaum), shown(item.fussellVesely), shown(item.riskAchievementWorth), shown(item.riskReductionWorth)]),
      };
    case 'cut-sets':
      return {
        'number of cut sets': result!.cutSets.length,
        'cut sets': result!.cutSets.slice(0, CUT_SETS_KEPT).map((cutSet) => [cutSet.events.join(' '), shown(cutSet.probability)]),
      };
    case 'constraints':
      if (model.kind !== 'fault-tree') return { constraints: 'not given for a state model' };
      return {
        subsystems: architecturalConstraints(model).map((row) => [
          row.id,
          row.voting,
          row.hft,
          shown(row.sff),
          row.deviceType,
          row.route1HMaxSil,
          row.iec61511MaxSil,
          row.systematicCapability,
        ]),
      };
    case 'spurious-trips': {
      if (model.kind !== 'fault-tree') return { 'trips per hour': 'not given for a state model' };
      const trip = spuriousTripRate(model);
      return { 'trips per hour': shown(trip.ratePerHour), subsystems: trip.subsystems.map((row) => [row.id, shown(row.ratePerHour)]) };
    }
    case 'sensitivity':
      return { 'model content': contentHash };
  }
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

/** A number as the results page writes it (plain between 0.01 and 1e5, else 3 significant digits in exponent form). */
function written(value: Cell | Cell[][]): string {
  if (value === null) return 'none';
  if (typeof value !== 'number') return String(value);
  const magnitude = Math.abs(value);
  return value === 0 || (magnitude >= 0.01 && magnitude < 1e5) ? String(value) : value.toExponential(2);
}

const scalar = (value: unknown) => typeof value === 'number' || value === null || (typeof value === 'string' && value.length <= 30);

/**
 * How a figure changed, in words: "PFDavg 1.02e-6 -> 2.55e-6; cut sets changed"; null when it did not. Keys
 * come in the order the figure lists them now (the stored copy is jsonb, which keeps no key order).
 */
export function figureChange(before: FigureValues, now: FigureValues): string | null {
  const changes: string[] = [];
  for (const key of new Set([...Object.keys(now), ...Object.keys(before)])) {
    const old = before[key] ?? null;
    const current = now[key] ?? null;
    if (same(old, current)) continue;
    changes.push(key !== 'model content' && scalar(old) && scalar(current) ? `${key} ${written(old)} -> ${written(current)}` : `${key} changed`);
  }
  return changes.length > 0 ? changes.join('; ') : null;
}
