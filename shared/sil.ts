import { z } from 'zod';

/**
 * Safety integrity levels and their target bands, IEC 61508-1:2010 Table 2 (low demand: PFDavg) and
 * Table 3 (high demand or continuous: PFH, per hour). Each band includes its lower bound and excludes its
 * upper bound: PFDavg = 1e-3 is SIL 2 (>= 1e-3 to < 1e-2).
 */
export const silLevel = z.union([z.literal(1), z.literal(2), z.literal(3), z.literal(4)]);
export type SilLevel = z.infer<typeof silLevel>;

export interface SilBand {
  readonly sil: SilLevel;
  /** Inclusive lower bound. */
  readonly lower: number;
  /** Exclusive upper bound. */
  readonly upper: number;
}

export const LOW_DEMAND_BANDS: readonly SilBand[] = [
  { sil: 4, lower: 1e-5, upper: 1e-4 },
  { sil: 3, lower: 1e-4, upper: 1e-3 },
  { sil: 2, lower: 1e-3, upper: 1e-2 },
  { sil: 1, lower: 1e-2, upper: 1e-1 },
];

export const HIGH_DEMAND_BANDS: readonly SilBand[] = [
  { sil: 4, lower: 1e-9, upper: 1e-8 },
  { sil: 3, lower: 1e-8, upper: 1e-7 },
  { sil: 2, lower: 1e-7, upper: 1e-6 },
  { sil: 1, lower: 1e-6, upper: 1e-5 },
];

export type DemandKind = 'low' | 'high' | 'continuous';

export function bandsFor(demand: DemandKind): readonly SilBand[] {
  return demand === 'low' ? LOW_DEMAND_BANDS : HIGH_DEMAND_BANDS;
}

/**
 * The SIL a measure reaches: the band holding it, 4 when it is better than the SIL 4 band (the standard
 * caps claims at SIL 4), or null when it is worse than SIL 1 (PFDavg >= 0.1, PFH >= 1e-5).
 */
export function silReached(measure: number, demand: DemandKind): SilLevel | null {
  if (!Number.isFinite(measure) || measure < 0) return null;
  const bands = bandsFor(demand);
  for (const band of bands) {
    if (measure < band.upper) return band.sil;
  }
  return null;
}

/** The band of a SIL for a demand mode. */
export function bandOf(sil: SilLevel, demand: DemandKind): SilBand {
  const band = bandsFor(demand).find((candidate) => candidate.sil === sil);
  if (!band) throw new Error(`no band for SIL ${sil}`);
  return band;
}
