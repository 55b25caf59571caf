import { describe, expect, it } from 'vitest';
import { DEMO_MODEL } from '../seed/demo-model.js';
import { csvField, toCsv } from './csv.js';
import { downsampleMinMax } from './report-chart.js';
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
