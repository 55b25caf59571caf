import type { MethodResult } from '../../../shared/api/results.js';
import type { DerivedSifTarget } from '../../../shared/api/sif-target.js';
import { bandsFor, silReached, type SilBand, type SilLevel } from '../../../shared/sil.js';
import type { SolveResult } from '../../../shared/solve-result.js';

export interface Verdict {
  readonly measure: 'pfdAvg' | 'pfh';
  /** "PFDavg" or "PFH". */
  readonly measureName: string;
  readonly value: number;
  /** The limit of the target on the measure; null when the target is on the other measure. */
  readonly target: number | null;
  readonly limitInclusive: boolean;
  /** null when there is no target on this measure. */
  readonly meets: boolean | null;
  /** target / value: above 1 meets with that factor to spare, below 1 misses by its inverse. */
  readonly margin: number | null;
  readonly sil: SilLevel | null;
  /** The SIL band the value falls in (IEC 61508-1:2010 Table 2 or 3), null outside every band. */
  readonly band: SilBand | null;
  readonly rrf: number | null;
}

/**
 * The verdict of a result against a SIF's target: the measure by the demand mode (PFDavg low, PFH high
 * or continuous), the SIL band reached (each band includes its lower bound, shared/sil.ts), and whether
 * and by how much the target is met (at the limit only when the target says so).
 */
export function verdictOf(result: Pick<SolveResult, 'demand' | 'pfdAvg' | 'pfh' | 'rrf'>, target: DerivedSifTarget): Verdict {
  const low = result.demand === 'low';
  const value = low ? result.pfdAvg : result.pfh;
  const limit = low ? target.pfdAvg : target.pfh;
  const meets = limit === null ? null : target.limitInclusive ? value <= limit : value < limit;
  const sil = silReached(value, result.demand);
  return {
    measure: low ? 'pfdAvg' : 'pfh',
    measureName: low ? 'PFDavg' : 'PFH',
    value,
    target: limit,
    limitInclusive: target.limitInclusive,
    meets,
    margin: limit === null ? null : value > 0 ? limit / value : Number.POSITIVE_INFINITY,
    sil,
    band: bandsFor(result.demand).find((band) => value >= band.lower && value < band.upper) ?? null,
    rrf: low && result.pfdAvg > 0 ? result.rrf : null,
  };
}

export interface MethodRow {
  readonly key: string;
  /** The method and its source, e.g. "Simplified: IEC 61508-6:2010 Annex B, 1oo2". */
  readonly name: string;
  readonly scope: string;
  readonly value: number | null;
  /** The Monte Carlo interval, e.g. 99 %. */
  readonly interval: { level: number; lower: number; upper: number } | null;
  /** (exact - simplified) / simplified, for a simplified value of the whole function. */
  readonly deviation: number | null;
  readonly warnings: readonly string[];
  /** Another solve's id when the row comes from a companion solve. */
  readonly solveId: string | null;
}

/**
 * The methods side by side: each simplified formula the solver matched (named with its source), the
 * exact result and the Monte Carlo check with its interval, when a solve of the same content ran it.
 */
export function methodRows(result: SolveResult, methods: readonly MethodResult[], currentSolveId: string): MethodRow[] {
  const low = result.demand === 'low';
  const rows: MethodRow[] = result.simplified.map((item, index) => ({
    key: `simplified-${index}`,
    name: `Simplified: ${item.formula}`,
    scope: item.scope,
    value: low ? item.pfdAvg : item.pfh,
    interval: null,
    deviation: item.deviation,
    warnings: item.warnings,
    solveId: null,
  }));
  const ordered = [...methods].sort((a, b) => (a.method === b.method ? 0 : a.method === 'exact' ? -1 : 1));
  for (const method of ordered) {
    const interval = method.interval ? (low ? method.interval.pfdAvg : method.interval.pfh) : null;
    rows.push({
      key: `solve-${method.solveId}`,
      name: method.method === 'montecarlo' ? `Monte Carlo (${method.samples ?? '?'} missions)` : `Exact (${method.engine === 'markov' ? 'Markov' : 'fault tree'})`,
      scope: 'whole function',
      value: low ? method.pfdAvg : method.pfh,
      interval,
      deviation: null,
      warnings: [],
      solveId: method.solveId === currentSolveId ? null : method.solveId,
    });
  }
  return rows;
}

/** Every warning about the validity of the numbers: the solver's and each simplified formula's, scoped. */
export function validityWarnings(result: Pick<SolveResult, 'warnings' | 'simplified'>): string[] {
  return [...result.warnings, ...result.simplified.flatMap((item) => item.warnings.map((warning) => `${item.scope}: ${warning}`))];
}

/** A probability or rate in engineering notation: 3 significant digits, exponent below 0.01. */
export function formatMeasure(value: number | null | undefined): string {
  if (value === null || value === undefined || Number.isNaN(value)) return '–';
  if (!Number.isFinite(value) || value >= Number.MAX_VALUE / 2) return '∞';
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  return magnitude >= 0.01 && magnitude < 1e5 ? String(Number(value.toPrecision(3))) : value.toExponential(2);
}

export function formatPercent(value: number | null | undefined): string {
  return value === null || value === undefined ? '–' : `${(value * 100).toFixed(1)} %`;
}

export interface MonteCarloMeasure {
  readonly measure: 'pfdAvg' | 'pfh';
  /** "PFDavg" or "PFH". */
  readonly measureName: string;
  readonly estimate: number;
  readonly interval: { level: number; lower: number; upper: number };
  /** The exact engine's value of the same content, or null when no exact solve of it succeeded. */
  readonly exact: number | null;
  /** Whether the exact value lies in the interval (bounds included); null without an exact value. */
  readonly exactInside: boolean | null;
  /** (estimate - exact) / exact, or null without a non-zero exact value. */
  readonly difference: number | null;
}

export interface MonteCarloAgreement {
  readonly solveId: string;
  readonly samples: number | null;
  /** The measure of the demand mode first (PFDavg low, PFH otherwise), then the other. */
  readonly measures: readonly MonteCarloMeasure[];
}

/**
 * The Monte Carlo check against the exact value of the same model content: each measure's estimate, its
 * interval (99 % from the engine) and whether the exact value lies inside. An exact value outside the
 * interval happens by chance in 1 check of 100 at that level; more often it points at a modelling
 * difference between the engines (common practice of verifying a numerical method by simulation).
 */
export function monteCarloAgreement(methods: readonly MethodResult[], demand: SolveResult['demand']): MonteCarloAgreement | null {
  const simulated = methods.find((method) => method.method === 'montecarlo');
  if (!simulated?.interval) return null;
  const exact = methods.find((method) => method.method === 'exact') ?? null;
  const order: ('pfdAvg' | 'pfh')[] = demand === 'low' ? ['pfdAvg', 'pfh'] : ['pfh', 'pfdAvg'];
  return {
    solveId: simulated.solveId,
    samples: simulated.samples,
    measures: order.map((measure) => {
      const interval = simulated.interval![measure];
      const exactValue = exact ? exact[measure] : null;
      return {
        measure,
        measureName: measure === 'pfdAvg' ? 'PFDavg' : 'PFH',
        estimate: simulated[measure],
        interval,
        exact: exactValue,
        exactInside: exactValue === null ? null : exactValue >= interval.lower && exactValue <= interval.upper,
        difference: exactValue === null || exactValue === 0 ? null : (simulated[measure] - exactValue) / exactValue,
      };
    }),
  };
}
