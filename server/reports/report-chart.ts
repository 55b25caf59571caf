import { bandsFor, type DemandKind } from '../../shared/sil.js';

export interface ChartInput {
  readonly hours: readonly number[];
  /** PFD(t), or the failure frequency w(t) per hour. */
  readonly values: readonly number[];
  /** The average drawn as a line: PFDavg, or PFH. */
  readonly average: number;
  /** The SIL bands shaded: of PFDavg (IEC 61508-1:2010 Table 2), of PFH (Table 3), or none. */
  readonly bands: DemandKind | null;
  /** The target on the drawn measure, or null. */
  readonly target: number | null;
}

const WIDTH = 500;
const HEIGHT = 210;
const LEFT = 46;
const BOTTOM = 24;
const TOP = 6;
const RIGHT = 8;

/**
 * Keeps at most `buckets` x 2 points of a curve: the lowest and highest of each bucket in time order, so
 * every tooth of the sawtooth keeps its peak and its foot (common practice for drawing dense series).
 */
export function downsampleMinMax(hours: readonly number[], values: readonly number[], buckets: number): { hours: number[]; values: number[] } {
  if (hours.length <= buckets * 2) return { hours: [...hours], values: [...values] };
  const outHours: number[] = [];
  const outValues: number[] = [];
  const size = hours.length / buckets;
  for (let bucket = 0; bucket < buckets; bucket++) {
    const start = Math.floor(bucket * size);
    const end = Math.min(hours.length, Math.floor((bucket + 1) * size));
    let low = start;
    let high = start;
    for (let index = start; index < end; index++) {
      if (values[index] < values[low]) low = index;
      if (values[index] > values[high]) high = index;
    }
    for (const index of low <= high ? [low, high] : [high, low]) {
      outHours.push(hours[index]);
      outValues.push(values[index]);
    }
  }
  return { hours: outHours, values: outValues };
}

function escapeXml(text: string): string {
  return text.replace(/[<>&"]/g, (character) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', '"': '&quot;' })[character] as string);
}

/**
 * A curve of the report as SVG on a log axis: the PFD(t) sawtooth or w(t), the average line (PFDavg or
 * PFH), the target line and the SIL bands shaded. The axis keeps at most 7 decades below the highest
 * value, so a curve starting at 0 does not squash the part that matters.
 */
export function curveChartSvg(input: ChartInput): string {
  let largest = Math.max(input.target ?? 0, input.average);
  let smallest = Number.POSITIVE_INFINITY;
  for (const value of input.values) {
    if (value > largest) largest = value;
    if (value > 0 && value < smallest) smallest = value;
  }
  if (!Number.isFinite(smallest)) smallest = input.average > 0 ? input.average : 1e-6;
  const bands = input.bands === null ? [] : bandsFor(input.bands);
  const highest = largest * 2;
  const lowest = Math.max(highest * 1e-7, smallest / 2);
  const logLow = Math.floor(Math.log10(lowest));
  const logHigh = Math.ceil(Math.log10(Math.max(highest, lowest * 10)));
  const mission = input.hours[input.hours.length - 1] || 1;
  const plotWidth = WIDTH - LEFT - RIGHT;
  const plotHeight = HEIGHT - TOP - BOTTOM;
  const x = (hours: number) => LEFT + (hours / mission) * plotWidth;
  const y = (value: number) => {
    const clamped = Math.min(Math.max(value, 10 ** logLow), 10 ** logHigh);
    return TOP + plotHeight - ((Math.log10(clamped) - logLow) / (logHigh - logLow)) * plotHeight;
  };
  const parts: string[] = [`<svg xmlns="http://www.w3.org/2000/svg" width="${WIDTH}" height="${HEIGHT}" viewBox="0 0 ${WIDTH} ${HEIGHT}">`];
  const shades = ['#e8f0fb', '#f3f7fd'];
  bands.forEach((band, index) => {
    const top = y(band.upper);
    const bottom = y(band.lower);
    if (bottom - top > 0.5) parts.push(`<rect x="${LEFT}" y="${top.toFixed(2)}" width="${plotWidth}" height="${(bottom - top).toFixed(2)}" fill="${shades[index % 2]}"/>`);
  });
  parts.push(`<rect x="${LEFT}" y="${TOP}" width="${plotWidth}" height="${plotHeight}" fill="none" stroke="#666" stroke-width="0.6"/>`);
  for (let exponent = logLow; exponent <= logHigh; exponent++) {
    const position = y(10 ** exponent);
    parts.push(`<line x1="${LEFT - 3}" y1="${position.toFixed(2)}" x2="${LEFT}" y2="${position.toFixed(2)}" stroke="#666" stroke-width="0.6"/>`);
    parts.push(`<text x="${LEFT - 5}" y="${(position + 3).toFixed(2)}" font-size="7" text-anchor="end" fill="#333">${escapeXml(`1e${exponent}`)}</text>`);
  }
  const years = mission / 8760;
  const step = years > 12 ? 5 : years > 4 ? 1 : 0.5;
  for (let year = 0; year <= years + 1e-9; year += step) {
    const position = x(year * 8760);
    parts.push(`<line x1="${position.toFixed(2)}" y1="${HEIGHT - BOTTOM}" x2="${position.toFixed(2)}" y2="${HEIGHT - BOTTOM + 3}" stroke="#666" stroke-width="0.6"/>`);
    parts.push(`<text x="${position.toFixed(2)}" y="${HEIGHT - BOTTOM + 11}" font-size="7" text-anchor="middle" fill="#333">${year}</text>`);
  }
  parts.push(`<text x="${LEFT + plotWidth / 2}" y="${HEIGHT - 3}" font-size="7" text-anchor="middle" fill="#333">years</text>`);
  const sampled = downsampleMinMax(input.hours, input.values, 600);
  const points = sampled.hours.map((hours, index) => `${x(hours).toFixed(2)},${y(sampled.values[index]).toFixed(2)}`).join(' ');
  parts.push(`<polyline points="${points}" fill="none" stroke="#1f5fbf" stroke-width="0.8"/>`);
  parts.push(`<line x1="${LEFT}" y1="${y(input.average).toFixed(2)}" x2="${LEFT + plotWidth}" y2="${y(input.average).toFixed(2)}" stroke="#2e7d32" stroke-width="0.8"/>`);
  if (input.target !== null) {
    parts.push(`<line x1="${LEFT}" y1="${y(input.target).toFixed(2)}" x2="${LEFT + plotWidth}" y2="${y(input.target).toFixed(2)}" stroke="#c62828" stroke-width="0.8" stroke-dasharray="4,3"/>`);
  }
  parts.push('</svg>');
  return parts.join('');
}
