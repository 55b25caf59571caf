/**
 * Units the user may type failure rates and intervals in. The model file stores rates per hour and
 * times in hours (shared/model-file.ts); these convert on the way in and out of the forms.
 * 1 FIT = 1e-9 failures per hour (IEC 61508-4 3.6.x usage, common practice); a year is 8760 h and a month
 * a twelfth of it, 730 h (common practice in IEC 61508-6 Annex B examples, which use 8760 h per year).
 */
export const HOURS_PER_YEAR = 8760;
export const HOURS_PER_MONTH = HOURS_PER_YEAR / 12;

export type RateUnit = 'perHour' | 'fit' | 'perYear';
export type IntervalUnit = 'hours' | 'months' | 'years';

export const RATE_UNITS: readonly RateUnit[] = ['perHour', 'fit', 'perYear'];
export const INTERVAL_UNITS: readonly IntervalUnit[] = ['hours', 'months', 'years'];

export const RATE_UNIT_LABELS: Record<RateUnit, string> = { perHour: 'per hour', fit: 'FIT', perYear: 'per year' };
export const INTERVAL_UNIT_LABELS: Record<IntervalUnit, string> = { hours: 'hours', months: 'months', years: 'years' };

/** How many per-hour units one of the given unit is. */
const PER_HOUR_FACTOR: Record<RateUnit, number> = { perHour: 1, fit: 1e-9, perYear: 1 / HOURS_PER_YEAR };
const HOURS_FACTOR: Record<IntervalUnit, number> = { hours: 1, months: HOURS_PER_MONTH, years: HOURS_PER_YEAR };

/** A rate typed in `unit`, as stored (per hour). */
export function rateToPerHour(value: number, unit: RateUnit): number {
  return value * PER_HOUR_FACTOR[unit];
}

/** A stored rate (per hour) in `unit`. */
export function rateFromPerHour(perHour: number, unit: RateUnit): number {
  return perHour / PER_HOUR_FACTOR[unit];
}

/** An interval typed in `unit`, as stored (hours). */
export function intervalToHours(value: number, unit: IntervalUnit): number {
  return value * HOURS_FACTOR[unit];
}

/** A stored interval (hours) in `unit`. */
export function intervalFromHours(hours: number, unit: IntervalUnit): number {
  return hours / HOURS_FACTOR[unit];
}

/**
 * Reads a number the user typed: plain or scientific notation ("2.5e-7", "2,5E-7" with a decimal comma).
 * Returns null for an empty field and NaN for text that is not a number.
 */
export function readTypedNumber(text: string): number | null {
  const trimmed = text.trim();
  if (trimmed === '') return null;
  const normalized = trimmed.replace(',', '.');
  if (!/^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(normalized)) return Number.NaN;
  return Number(normalized);
}

/** Shows a number compactly for a form field: up to 6 significant digits, scientific when small or large. */
export function formatTyped(value: number): string {
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude < 1e-3 || magnitude >= 1e7) return value.toExponential(Math.min(5, significantDecimals(value))).replace('e+', 'e');
  return String(Number(value.toPrecision(6)));
}

function significantDecimals(value: number): number {
  const mantissa = Number(value.toExponential(5).split('e')[0]);
  const text = String(mantissa);
  const dot = text.indexOf('.');
  return dot === -1 ? 0 : text.length - dot - 1;
}

/** A rate for display on the canvas: "2.0e-7 /h". */
export function formatRate(perHour: number): string {
  return `${perHour === 0 ? '0' : perHour.toExponential(1)} /h`;
}

/** An interval for display on the canvas, in the largest unit that reads naturally: "12 mo", "1 y", "8 h". */
export function formatInterval(hours: number): string {
  if (hours >= HOURS_PER_YEAR && Number.isInteger(Number((hours / HOURS_PER_YEAR).toFixed(6)))) return `${hours / HOURS_PER_YEAR} y`;
  if (hours >= HOURS_PER_MONTH && Number.isInteger(Number((hours / HOURS_PER_MONTH).toFixed(6)))) return `${hours / HOURS_PER_MONTH} mo`;
  return `${Number(hours.toPrecision(4))} h`;
}
