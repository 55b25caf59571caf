import { deriveSifTarget, type DerivedSifTarget, type SifDemandMode, type SifTarget } from '../../../shared/api/sif-target.js';
import type { SolveResult } from '../../../shared/solve-result.js';
import { formatMeasure, methodRows, validityWarnings, verdictOf } from './verdict';

function target(value: SifTarget, demand: SifDemandMode): DerivedSifTarget {
  const check = deriveSifTarget(value, demand);
  if (!check.ok) throw new Error(check.issue.message);
  return check.derived;
}

function low(pfdAvg: number) {
  return { demand: 'low' as const, pfdAvg, pfh: 0, rrf: 1 / pfdAvg };
}

describe('verdictOf: SIL bands of IEC 61508-1:2010 Table 2 (low demand) and Table 3 (high demand), lower bound inclusive', () => {
  const sil2 = target({ kind: 'sil', value: 2 }, 'low');

  it.each([
    [1e-3, 2],
    [9.999e-4, 3],
    [1e-2, 1],
    [9.999e-3, 2],
    [1e-4, 3],
    [1e-5, 4],
    [1e-6, 4],
  ])('PFDavg %s is SIL %s', (pfdAvg, sil) => {
    expect(verdictOf(low(pfdAvg), sil2).sil).toBe(sil);
  });

  it('PFDavg 0.1 and above is below SIL 1, with no band', () => {
    const verdict = verdictOf(low(0.1), sil2);
    expect(verdict.sil).toBeNull();
    expect(verdict.band).toBeNull();
  });

  it('a SIL 2 target is met below 1e-2 and missed at 1e-2 (the band upper bound is exclusive)', () => {
    expect(verdictOf(low(9.99e-3), sil2).meets).toBe(true);
    const atLimit = verdictOf(low(1e-2), sil2);
    expect(atLimit.meets).toBe(false);
    expect(atLimit.margin).toBeCloseTo(1, 12);
  });

  it('a numeric PFDavg target is met at its value (limit inclusive) and the margin is target / value', () => {
    const numeric = target({ kind: 'pfdAvg', value: 5e-3 }, 'low');
    expect(verdictOf(low(5e-3), numeric).meets).toBe(true);
    expect(verdictOf(low(5.0001e-3), numeric).meets).toBe(false);
    expect(verdictOf(low(1e-3), numeric).margin).toBeCloseTo(5, 12);
  });

  it('an RRF target of 300 is PFDavg <= 1/300', () => {
    const rrf = target({ kind: 'rrf', value: 300 }, 'low');
    expect(verdictOf(low(1 / 300), rrf).meets).toBe(true);
    expect(verdictOf(low(1 / 299), rrf).meets).toBe(false);
  });

  it('high demand is judged by PFH: 1e-7 per hour is SIL 2, 9.99e-8 SIL 3; a 3e-7 target', () => {
    const pfhTarget = target({ kind: 'pfh', value: 3e-7 }, 'high');
    const at = verdictOf({ demand: 'high', pfdAvg: 0.5, pfh: 1e-7, rrf: 2 }, pfhTarget);
    expect(at.measure).toBe('pfh');
    expect(at.sil).toBe(2);
    expect(at.meets).toBe(true);
    expect(at.rrf).toBeNull();
    expect(verdictOf({ demand: 'high', pfdAvg: 0.5, pfh: 9.99e-8, rrf: 2 }, pfhTarget).sil).toBe(3);
    expect(verdictOf({ demand: 'high', pfdAvg: 0.5, pfh: 3.01e-7, rrf: 2 }, pfhTarget).meets).toBe(false);
  });
});

describe('verdictOf: every edge of IEC 61508-1:2010 Table 3 (PFH per hour, high or continuous demand), lower bound inclusive', () => {
  const sil3 = target({ kind: 'sil', value: 3 }, 'high');
  const high = (pfh: number, demand: 'high' | 'continuous' = 'high') => ({ demand, pfdAvg: 0.5, pfh, rrf: 2 });

  it.each([
    [1e-9, 4],
    [9.999e-9, 4],
    [1e-8, 3],
    [9.999e-8, 3],
    [1e-7, 2],
    [9.999e-7, 2],
    [1e-6, 1],
    [9.999e-6, 1],
  ])('PFH %s per hour is SIL %s, in the band that starts at or below it', (pfh, sil) => {
    const verdict = verdictOf(high(pfh), sil3);
    expect(verdict.sil).toBe(sil);
    expect(verdict.band?.sil).toBe(sil);
    expect(verdict.band!.lower).toBeLessThanOrEqual(pfh);
    expect(verdict.band!.upper).toBeGreaterThan(pfh);
  });

  it('PFH 1e-5 per hour and above is below SIL 1; below 1e-9 the claim stays SIL 4 with no band (the table ends there)', () => {
    expect(verdictOf(high(1e-5), sil3).sil).toBeNull();
    expect(verdictOf(high(1e-5), sil3).band).toBeNull();
    expect(verdictOf(high(1e-10), sil3).sil).toBe(4);
    expect(verdictOf(high(1e-10), sil3).band).toBeNull();
  });

  it('continuous demand uses the same table; a SIL 3 target is met below 1e-7 and missed at it', () => {
    expect(verdictOf(high(5e-8, 'continuous'), sil3)).toMatchObject({ measure: 'pfh', sil: 3, meets: true });
    expect(verdictOf(high(1e-7, 'continuous'), sil3).meets).toBe(false);
  });
});

describe('methods side by side and warnings', () => {
  const result = {
    demand: 'low',
    pfdAvg: 1.2e-3,
    pfh: 1e-8,
    warnings: ['the PFDavg integral reached 1e-5 only'],
    simplified: [{ scope: 'whole function: 1oo2', formula: 'IEC 61508-6:2010 Annex B, 1oo2', pfdAvg: 1e-3, pfh: null, deviation: 0.2, warnings: ['partial tests are left out of the formula'] }],
  } as unknown as SolveResult;

  it('lists the simplified formula with its source and deviation, then exact, then Monte Carlo with its interval', () => {
    const rows = methodRows(
      result,
      [
        { solveId: 'b', method: 'montecarlo', engine: 'montecarlo', algorithm: 'x', pfdAvg: 1.25e-3, pfh: 0, interval: { pfdAvg: { level: 0.99, lower: 1.1e-3, upper: 1.4e-3 }, pfh: { level: 0.99, lower: 0, upper: 0 } }, samples: 10000 },
        { solveId: 'a', method: 'exact', engine: 'fault-tree', algorithm: 'BDD', pfdAvg: 1.2e-3, pfh: 1e-8, interval: null, samples: null },
      ],
      'a',
    );
    expect(rows.map((row) => row.name)).toEqual(['Simplified: IEC 61508-6:2010 Annex B, 1oo2', 'Exact (fault tree)', 'Monte Carlo (10000 missions)']);
    expect(rows[0].deviation).toBe(0.2);
    expect(rows[1].solveId).toBeNull();
    expect(rows[2].interval).toEqual({ level: 0.99, lower: 1.1e-3, upper: 1.4e-3 });
    expect(rows[2].solveId).toBe('b');
  });

  it('scopes each formula warning and keeps the solver warnings', () => {
    expect(validityWarnings(result)).toEqual(['the PFDavg integral reached 1e-5 only', 'whole function: 1oo2: partial tests are left out of the formula']);
  });

  it('formats measures with three significant digits and exponents below 0.01', () => {
    expect(formatMeasure(1.2345e-3)).toBe('1.23e-3');
    expect(formatMeasure(0.0345)).toBe('0.0345');
    expect(formatMeasure(793.2)).toBe('793');
    expect(formatMeasure(Number.MAX_VALUE)).toBe('∞');
    expect(formatMeasure(null)).toBe('–');
  });
});
