import { z } from 'zod';
import { bandOf, bandsFor, silLevel, silReached, type DemandKind, type SilLevel } from '../sil.js';

/**
 * A SIF's target, stored once as the figure the hazard analysis (e.g. LOPA) gave: a SIL, a risk reduction
 * factor (RRF = 1 / PFDavg), a PFDavg, or a PFH (per hour). The other forms are derived from it, never
 * stored, by `deriveSifTarget`, which the client and the server share.
 */
export const SIF_TARGET_KINDS = ['sil', 'rrf', 'pfdAvg', 'pfh'] as const;
export const sifTargetKind = z.enum(SIF_TARGET_KINDS, { message: 'must be one of sil, rrf, pfdAvg, pfh' });
export type SifTargetKind = z.infer<typeof sifTargetKind>;

export const sifTarget = z.strictObject({
  kind: sifTargetKind,
  value: z.number({ message: 'must be a number' }).finite('must be a finite number').positive('must be greater than 0'),
});
export type SifTarget = z.infer<typeof sifTarget>;

export const SIF_DEMAND_MODES = ['low', 'high', 'continuous'] as const;
export const sifDemandMode = z.enum(SIF_DEMAND_MODES, { message: 'must be one of low, high, continuous' });
export type SifDemandMode = z.infer<typeof sifDemandMode>;

/** The target in every form that applies to the demand mode. */
export const derivedSifTarget = z.object({
  /** The measure the function is judged by: PFDavg in low demand, PFH in high demand or continuous. */
  measure: z.enum(['pfdAvg', 'pfh']),
  sil: silLevel,
  /** Highest PFDavg that meets the target (low demand), else null. */
  pfdAvg: z.number().nullable(),
  /** Lowest RRF that meets the target (low demand), else null. */
  rrf: z.number().nullable(),
  /** Highest PFH (per hour) that meets the target (high demand or continuous), else null. */
  pfh: z.number().nullable(),
  /**
   * Whether a measure equal to the limit meets the target. A numeric target is met at its value
   * (PFDavg <= target); a SIL target is the band's exclusive upper bound (SIL 2: PFDavg < 1e-2).
   */
  limitInclusive: z.boolean(),
  /** The SIL band of the measure, IEC 61508-1:2010 Table 2 or Table 3. */
  band: z.object({ lower: z.number(), upper: z.number() }),
});
export type DerivedSifTarget = z.infer<typeof derivedSifTarget>;

/** A rule broken by a target or demand rate, with the field it is about. */
export interface SifRequirementIssue {
  readonly path: 'target.kind' | 'target.value' | 'demandRatePerYear';
  readonly message: string;
}

export type SifTargetCheck =
  | { readonly ok: true; readonly derived: DerivedSifTarget }
  | { readonly ok: false; readonly issue: SifRequirementIssue };

const LOW_KINDS: readonly SifTargetKind[] = ['sil', 'rrf', 'pfdAvg'];
const HIGH_KINDS: readonly SifTargetKind[] = ['sil', 'pfh'];

function bandRange(demand: DemandKind): { lower: number; upper: number } {
  const bands = bandsFor(demand);
  return { lower: Math.min(...bands.map((band) => band.lower)), upper: Math.max(...bands.map((band) => band.upper)) };
}

function fromMeasure(
  measure: number,
  demand: DemandKind,
  limitInclusive: boolean,
  sil: SilLevel,
  rrf = 1 / measure,
): DerivedSifTarget {
  const band = bandOf(sil, demand);
  const low = demand === 'low';
  return {
    measure: low ? 'pfdAvg' : 'pfh',
    sil,
    pfdAvg: low ? measure : null,
    rrf: low ? rrf : null,
    pfh: low ? null : measure,
    limitInclusive,
    band: { lower: band.lower, upper: band.upper },
  };
}

/**
 * Derives the other forms of a target for a demand mode and checks that the target fits it.
 * Low demand takes SIL, RRF or PFDavg (IEC 61508-1:2010 Table 2); high demand and continuous take SIL or
 * PFH (Table 3). A target must fall in the SIL 1..4 bands: a PFDavg in [1e-5, 1e-1) (RRF in (10, 1e5]),
 * a PFH in [1e-9, 1e-5) per hour; beyond SIL 4 no claim can be made (IEC 61508-1 7.6.2.9 caps at SIL 4),
 * and a figure worse than SIL 1 needs no SIL-rated function.
 */
export function deriveSifTarget(target: SifTarget, demandMode: SifDemandMode): SifTargetCheck {
  const low = demandMode === 'low';
  const allowed = low ? LOW_KINDS : HIGH_KINDS;
  if (!allowed.includes(target.kind)) {
    return {
      ok: false,
      issue: {
        path: 'target.kind',
        message: low
          ? `a ${target.kind} target does not apply in low demand mode: give SIL, RRF or PFDavg (IEC 61508-1 Table 2)`
          : `a ${target.kind} target does not apply in ${demandMode} demand mode: give SIL or PFH (IEC 61508-1 Table 3)`,
      },
    };
  }
  if (!Number.isFinite(target.value) || target.value <= 0) {
    return { ok: false, issue: { path: 'target.value', message: 'must be a finite number greater than 0' } };
  }
  if (target.kind === 'sil') {
    const parsed = silLevel.safeParse(target.value);
    if (!parsed.success) {
      return { ok: false, issue: { path: 'target.value', message: 'a SIL target must be 1, 2, 3 or 4' } };
    }
    const band = bandOf(parsed.data, demandMode);
    return { ok: true, derived: fromMeasure(band.upper, demandMode, false, parsed.data) };
  }
  const measure = target.kind === 'rrf' ? 1 / target.value : target.value;
  const range = bandRange(demandMode);
  const sil = silReached(measure, demandMode);
  if (sil === null || measure < range.lower) {
    const message =
      target.kind === 'rrf'
        ? `an RRF target must be greater than ${Math.round(1 / range.upper)} (SIL 1) and at most ${Math.round(1 / range.lower)} (SIL 4)`
        : target.kind === 'pfdAvg'
          ? `a PFDavg target must be at least ${range.lower} (SIL 4) and below ${range.upper} (SIL 1)`
          : `a PFH target must be at least ${range.lower} per hour (SIL 4) and below ${range.upper} per hour (SIL 1)`;
    return { ok: false, issue: { path: 'target.value', message } };
  }
  const rrf = target.kind === 'rrf' ? target.value : 1 / measure;
  return { ok: true, derived: fromMeasure(measure, demandMode, true, sil, rrf) };
}

/**
 * Checks a demand rate against the demand mode: low demand means at most one demand per year, high
 * demand more than one (IEC 61508-4:2010 3.5.16, IEC 61511-1:2016 3.2.39). Continuous mode and an
 * unknown rate (null) are not checked.
 */
export function checkDemandRate(demandMode: SifDemandMode, demandRatePerYear: number | null): SifRequirementIssue | null {
  if (demandRatePerYear === null || demandMode === 'continuous') return null;
  if (demandMode === 'low' && demandRatePerYear > 1) {
    return {
      path: 'demandRatePerYear',
      message: 'low demand mode means at most one demand per year (IEC 61508-4 3.5.16): lower the rate or choose high demand',
    };
  }
  if (demandMode === 'high' && demandRatePerYear <= 1) {
    return {
      path: 'demandRatePerYear',
      message: 'high demand mode means more than one demand per year (IEC 61508-4 3.5.16): raise the rate or choose low demand',
    };
  }
  return null;
}

/** Every rule a SIF's demand mode, target and demand rate must meet together; empty when all hold. */
export function sifRequirementIssues(fields: {
  demandMode: SifDemandMode;
  target: SifTarget;
  demandRatePerYear: number | null;
}): SifRequirementIssue[] {
  const issues: SifRequirementIssue[] = [];
  const check = deriveSifTarget(fields.target, fields.demandMode);
  if (!check.ok) issues.push(check.issue);
  const rateIssue = checkDemandRate(fields.demandMode, fields.demandRatePerYear);
  if (rateIssue) issues.push(rateIssue);
  return issues;
}
