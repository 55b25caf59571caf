import type { SifDemandMode, SifTargetKind } from '../../../shared/api/sif-target.js';
import type { Sif, SifStatus } from '../../../shared/api/sifs.js';

export const STATUS_LABELS: Record<SifStatus, string> = {
  draft: 'Draft',
  'in-review': 'In review',
  approved: 'Approved',
  superseded: 'Superseded',
};

export const DEMAND_MODE_LABELS: Record<SifDemandMode, string> = {
  low: 'Low demand',
  high: 'High demand',
  continuous: 'Continuous',
};

export const TARGET_KIND_LABELS: Record<SifTargetKind, string> = {
  sil: 'SIL',
  rrf: 'RRF',
  pfdAvg: 'PFDavg',
  pfh: 'PFH (per hour)',
};

/**
 * A probability or frequency in the engineer's usual notation: three significant digits, in exponent
 * form below 0.1 ("2.50e-3").
 */
export function formatMeasure(value: number): string {
  if (value !== 0 && Math.abs(value) < 0.1) return value.toExponential(2);
  return String(Number(value.toPrecision(3)));
}

/** A risk reduction factor: whole numbers up to four significant digits ("100", "1 250"). */
export function formatRiskReduction(value: number): string {
  return Number(value.toPrecision(4)).toLocaleString('en-GB');
}

/** How the register shows a SIF's target: the figure as given, and the SIL it means. */
export function targetSummary(record: Pick<Sif, 'target' | 'derivedTarget'>): string {
  const { kind, value } = record.target;
  const sil = `SIL ${record.derivedTarget.sil}`;
  switch (kind) {
    case 'sil':
      return sil;
    case 'rrf':
      return `RRF ${formatRiskReduction(value)} (${sil})`;
    case 'pfdAvg':
      return `PFDavg ${formatMeasure(value)} (${sil})`;
    case 'pfh':
      return `PFH ${formatMeasure(value)}/h (${sil})`;
  }
}
