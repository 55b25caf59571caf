import { describe, expect, it } from 'vitest';
import { checkDemandRate, deriveSifTarget, sifRequirementIssues } from './sif-target.js';

// Bands: IEC 61508-1:2010 Table 2 (low demand, PFDavg) and Table 3 (high demand / continuous, PFH per
// hour); each band includes its lower bound and excludes its upper bound (shared/sil.ts). RRF = 1 / PFDavg
// (IEC 61511-1:2016 3.2.63, from memory). Exact comparisons unless a tolerance is stated.

describe('deriveSifTarget, low demand', () => {
  it.each([
    [1, 1e-1, 10],
    [2, 1e-2, 100],
    [3, 1e-3, 1000],
    [4, 1e-4, 10000],
  ])('SIL %i: PFDavg below %d, RRF above %d (band upper bound, exclusive)', (sil, pfdAvg, rrf) => {
    const check = deriveSifTarget({ kind: 'sil', value: sil }, 'low');
    expect(check).toEqual({
      ok: true,
      derived: expect.objectContaining({ measure: 'pfdAvg', sil, pfdAvg, pfh: null, limitInclusive: false }),
    });
    if (check.ok) expect(check.derived.rrf).toBeCloseTo(rrf, 9);
  });

  it.each([
    [5e-2, 1],
    [1e-2, 1],
    [9.99e-3, 2],
    [2e-3, 2],
    [1e-3, 2],
    [9.99e-4, 3],
    [1e-5, 4],
  ])('PFDavg %d is SIL %i (lower bound inclusive)', (pfdAvg, sil) => {
    const check = deriveSifTarget({ kind: 'pfdAvg', value: pfdAvg }, 'low');
    expect(check.ok && check.derived).toMatchObject({ sil, pfdAvg, limitInclusive: true });
  });

  it.each([
    [11, 1],
    [100, 1],
    [101, 2],
    [300, 2],
    [1000, 2],
    [1001, 3],
    [100000, 4],
  ])('RRF %d is SIL %i (IEC 61511-1:2016 Table 4 bands >10..<=100, >100..<=1000, from memory) and keeps the RRF as given', (rrf, sil) => {
    const check = deriveSifTarget({ kind: 'rrf', value: rrf }, 'low');
    expect(check.ok && check.derived).toMatchObject({ sil, rrf });
    // PFDavg = 1 / RRF, relative tolerance 1e-12.
    if (check.ok) expect(Math.abs((check.derived.pfdAvg as number) * rrf - 1)).toBeLessThan(1e-12);
  });

  it.each([
    [{ kind: 'rrf', value: 10 } as const, 'target.value'],
    [{ kind: 'rrf', value: 100001 } as const, 'target.value'],
    [{ kind: 'pfdAvg', value: 0.1 } as const, 'target.value'],
    [{ kind: 'pfdAvg', value: 9e-6 } as const, 'target.value'],
    [{ kind: 'sil', value: 0 } as const, 'target.value'],
    [{ kind: 'sil', value: 2.5 } as const, 'target.value'],
    [{ kind: 'pfh', value: 1e-7 } as const, 'target.kind'],
  ])('refuses %o, naming %s', (target, path) => {
    const check = deriveSifTarget(target, 'low');
    expect(check.ok).toBe(false);
    if (!check.ok) {
      expect(check.issue.path).toBe(path);
      expect(check.issue.message.length).toBeGreaterThan(10);
    }
  });
});

describe('deriveSifTarget, high demand and continuous', () => {
  it.each(['high', 'continuous'] as const)('%s: SIL 3 is PFH below 1e-7 per hour', (mode) => {
    const check = deriveSifTarget({ kind: 'sil', value: 3 }, mode);
    expect(check.ok && check.derived).toEqual({
      measure: 'pfh',
      sil: 3,
      pfdAvg: null,
      rrf: null,
      pfh: 1e-7,
      limitInclusive: false,
      band: { lower: 1e-8, upper: 1e-7 },
    });
  });

  it.each([
    [3e-7, 2],
    [1e-6, 1],
    [1e-9, 4],
  ])('PFH %d per hour is SIL %i', (pfh, sil) => {
    const check = deriveSifTarget({ kind: 'pfh', value: pfh }, 'high');
    expect(check.ok && check.derived).toMatchObject({ sil, pfh, limitInclusive: true });
  });

  it.each([
    [{ kind: 'pfh', value: 1e-5 } as const, 'target.value'],
    [{ kind: 'pfh', value: 5e-10 } as const, 'target.value'],
    [{ kind: 'rrf', value: 1000 } as const, 'target.kind'],
    [{ kind: 'pfdAvg', value: 1e-3 } as const, 'target.kind'],
  ])('refuses %o, naming %s', (target, path) => {
    const check = deriveSifTarget(target, 'continuous');
    expect(!check.ok && check.issue.path).toBe(path);
  });
});

describe('checkDemandRate', () => {
  // IEC 61508-4:2010 3.5.16: low demand is at most one demand per year, high demand more than one.
  it('accepts one demand a year in low demand and refuses more', () => {
    expect(checkDemandRate('low', 1)).toBeNull();
    expect(checkDemandRate('low', 1.5)?.path).toBe('demandRatePerYear');
  });

  it('refuses one demand a year or less in high demand', () => {
    expect(checkDemandRate('high', 1)?.path).toBe('demandRatePerYear');
    expect(checkDemandRate('high', 2)).toBeNull();
  });

  it('does not check continuous mode or an unknown rate', () => {
    expect(checkDemandRate('continuous', 0.01)).toBeNull();
    expect(checkDemandRate('low', null)).toBeNull();
  });

  it('collects the target and the rate issues together', () => {
    const issues = sifRequirementIssues({ demandMode: 'low', target: { kind: 'pfh', value: 1e-7 }, demandRatePerYear: 5 });
    expect(issues.map((issue) => issue.path)).toEqual(['target.kind', 'demandRatePerYear']);
  });
});
