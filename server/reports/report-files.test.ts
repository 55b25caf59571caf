import { describe, expect, it } from 'vitest';
import { DEMO_MODEL } from '../seed/demo-model.js';
import type { SolveResult } from '../../shared/solve-result.js';
import { csvField, curveCsv, toCsv } from './csv.js';
import { curveChartSvg, downsampleMinMax } from './report-chart.js';
import { curveCharts } from './report-pdf.js';
import { faultTreeSvg } from './report-tree.js';

describe('CSV fields (RFC 4180 quoting; OWASP CSV injection guidance)', () => {
  it('quotes commas, quotes and line breaks, doubling quotes', () => {
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
  });
  it('prefixes text a spreadsheet would run as a formula, keeps numbers (negative ones too) as numbers', () => {
    for (const text of ['=1+1', '+1', '-1', '@SUM(A1)', '\tx', '\rx']) expect(csvField(text).replace(/^"/, '').startsWith("'")).toBe(true);
    expect(csvField(-1e-5)).toBe('-0.00001');
    expect(csvField(Number.NaN)).toBe('');
    expect(csvField(null)).toBe('');
    expect(toCsv(['a', 'b'], [[1, 'x']])).toBe('a,b\r\n1,x\r\n');
  });
});

describe('report pictures', () => {
  it('the tree picture has one box per drawn item and centres a gate over its inputs', () => {
    const { svg, truncated } = faultTreeSvg(DEMO_MODEL);
    expect(truncated).toBe(false);
    // 3 gates and 6 events, each once in this tree.
    expect(svg.match(/<rect /g)).toHaveLength(9);
    const xOf = (id: string) => Number(new RegExp(`<text x="([0-9.]+)"[^>]*>${id}<`).exec(svg)?.[1]);
    expect(xOf('SENSORS')).toBe(xOf('PT-1101B'));
    expect(xOf('VALVES')).toBe((xOf('XV-1101A') + xOf('XV-1101B')) / 2);
  });

  it('a wide tree is cut and says so', () => {
    expect(faultTreeSvg(DEMO_MODEL, 3).truncated).toBe(true);
  });

  it('min-max downsampling keeps every tooth: the peak and the foot of each bucket (common practice)', () => {
    const hours = Array.from({ length: 10_000 }, (_, index) => index);
    const values = hours.map((hour) => (hour % 1000) / 1000);
    const sampled = downsampleMinMax(hours, values, 100);
    expect(sampled.hours.length).toBe(200);
    expect(Math.max(...sampled.values)).toBe(0.999);
    expect(Math.min(...sampled.values)).toBe(0);
    expect([...sampled.hours].sort((a, b) => a - b)).toEqual(sampled.hours);
  });
});

/** One channel, lambda = 1e-7 per hour, never tested: PFD(t) = 1 - exp(-lambda t), w(t) = lambda exp(-lambda t) (exponential law). */
const LAMBDA = 1e-7;
const HOURS = Array.from({ length: 101 }, (_, index) => index * 876);
const CURVE = { hours: HOURS, pfd: HOURS.map((t) => 1 - Math.exp(-LAMBDA * t)), frequency: HOURS.map((t) => LAMBDA * Math.exp(-LAMBDA * t)) };

function highDemandResult(withFrequency: boolean): SolveResult {
  return {
    method: 'fault-tree',
    algorithm: 'test',
    solverVersion: '1.0.0',
    demand: 'high',
    missionHours: 87_600,
    pfdAvg: 4.3e-3,
    pfdMax: 8.7e-3,
    // The time average of w(t): (1 - exp(-lambda T)) / T.
    pfh: (1 - Math.exp(-LAMBDA * 87_600)) / 87_600,
    rrf: 232,
    sil: 3,
    curve: withFrequency ? CURVE : { hours: CURVE.hours, pfd: CURVE.pfd },
    simplified: [],
    cutSets: [],
    importance: [],
    warnings: [],
  };
}

/** Fill colours of the SIL band rectangles, which only the bands use. */
function bandRects(svg: string): number {
  return (svg.match(/<rect [^>]*fill="#(e8f0fb|f3f7fd)"/g) ?? []).length;
}

describe('the curve with w(t)', () => {
  it('the curve CSV carries w(t) per hour as a third column when the result has it', () => {
    const lines = curveCsv(CURVE).trim().split('\r\n');
    expect(lines[0]).toBe('hours,pfd,frequency_per_hour');
    expect(lines).toHaveLength(102);
    expect(lines[51].split(',').map(Number)).toEqual([HOURS[50], CURVE.pfd[50], CURVE.frequency[50]]);
    expect(curveCsv({ hours: CURVE.hours, pfd: CURVE.pfd }).split('\r\n')[0]).toBe('hours,pfd');
  });

  it('the report of a high-demand result draws w(t) against the PFH bands of IEC 61508-1:2010 Table 3, then PFD(t) without bands', () => {
    const charts = curveCharts(highDemandResult(true), 1e-6) as { text?: string; svg?: string }[];
    expect(charts.map((item) => item.text).filter(Boolean)).toEqual([
      'PFH: failure frequency w(t) over the mission',
      'Blue: w(t) per hour; green: its average, the PFH; red dashed: target; shaded: SIL bands (IEC 61508-1:2010 Table 3). Log axis.',
      'PFD(t) over the mission',
      'Blue: PFD(t); green: PFDavg. Log axis.',
    ]);
    const [pfhSvg, pfdSvg] = charts.flatMap((item) => (item.svg ? [item.svg] : []));
    // w(t) spans 9.9e-8 to 1e-7 and the target is 1e-6: the axis runs over whole decades from 1e-8 to 1e-5,
    // so the SIL 3, 2 and 1 bands are drawn and the SIL 4 band (1e-9 to 1e-8) lies below it.
    expect(bandRects(pfhSvg)).toBe(3);
    expect(bandRects(pfdSvg)).toBe(0);
  });

  it('the report of a high-demand result without w(t) says so and draws no made-up curve', () => {
    const charts = curveCharts(highDemandResult(false), 1e-6) as { text?: string; svg?: string }[];
    expect(charts[1].text).toContain('This result has no w(t) curve');
    expect(charts.filter((item) => item.svg)).toHaveLength(1);
  });

  it('the low-demand chart shades the bands of Table 2 in reach', () => {
    const svg = curveChartSvg({ hours: HOURS, values: CURVE.pfd, average: 4.3e-3, bands: 'low', target: 1e-2 });
    // PFD(t) runs from 8.8e-5 (first point after 0) to 8.7e-3 and the target is 1e-2: the axis spans
    // 1e-5 to 1e-1, all four bands of Table 2.
    expect(bandRects(svg)).toBe(4);
  });
});
