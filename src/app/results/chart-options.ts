import type { EChartsCoreOption } from 'echarts/core';
import { bandsFor, type DemandKind } from '../../../shared/sil.js';
import { formatMeasure } from './verdict';

const HOURS_PER_YEAR = 8760;
const BAND_COLOURS = ['rgba(46, 125, 50, 0.10)', 'rgba(46, 125, 50, 0.05)'];

export interface PfdChartInput {
  readonly hours: readonly number[];
  readonly pfd: readonly number[];
  /** The dangerous failure frequency w(t) per hour at `hours`, when the engine computed it. */
  readonly frequency?: readonly number[];
  readonly pfdAvg: number;
  readonly pfh: number;
  readonly demand: DemandKind;
  /** The target on the shown measure, or null. */
  readonly target: number | null;
  readonly logScale: boolean;
  /** 'pfd': the PFD(t) sawtooth; 'pfh': w(t) with its average, the PFH, against the high-demand bands. */
  readonly view: 'pfd' | 'pfh';
}

/** [lower, upper] of the y axis on a log scale: whole decades around the data, the target and the bands in reach. */
export function logAxisRange(values: readonly number[]): { min: number; max: number } {
  let smallest = Number.POSITIVE_INFINITY;
  let largest = 0;
  for (const value of values) {
    if (value > 0 && value < smallest) smallest = value;
    if (value > largest) largest = value;
  }
  if (!Number.isFinite(smallest)) return { min: 1e-6, max: 1 };
  const decade = (exponent: number) => Number(`1e${exponent}`);
  const min = decade(Math.floor(Math.log10(smallest / 2)));
  const max = decade(Math.ceil(Math.log10(largest * 1.5)));
  return { min, max: max > min ? max : min * 10 };
}

/** SIL bands as ECharts markArea pairs, labelled "SIL n" (IEC 61508-1:2010 Table 2 or 3). */
function bandAreas(demand: DemandKind) {
  return bandsFor(demand).map((band, index) => [
    { yAxis: band.lower, name: `SIL ${band.sil}`, itemStyle: { color: BAND_COLOURS[index % 2] }, label: { position: 'insideRight', color: '#2e5e30', fontSize: 11 } },
    { yAxis: band.upper },
  ]);
}

/**
 * The results chart, or null for the PFH view of a result without w(t) (the caller says so instead of
 * drawing made-up data). PFD(t): the sawtooth (x in years), the PFDavg line, the SIL bands of
 * IEC 61508-1:2010 Table 2 shaded. PFH: the failure frequency w(t) per hour, its time average (the PFH,
 * IEC 61508-6:2010 B.2.3) and the bands of Table 3. Both: the target line, zoom and pan by wheel, drag and
 * slider, a hover read-out, log or linear axis. Large curves are drawn by ECharts' own LTTB sampling with
 * no animation, so 10,000 points stay smooth.
 */
export function pfdChartOptions(input: PfdChartInput): EChartsCoreOption | null {
  const pfdView = input.view === 'pfd';
  const values = pfdView ? input.pfd : input.frequency;
  if (!values) return null;
  const data: [number, number][] = input.hours.map((hours, index) => [hours / HOURS_PER_YEAR, values[index]]);
  const average = pfdView ? input.pfdAvg : input.pfh;
  const averageName = pfdView ? 'PFDavg' : 'PFH';
  const range = logAxisRange([...values, average, ...(input.target !== null ? [input.target] : [])]);
  const marks: object[] = [{ yAxis: average, name: averageName, lineStyle: { color: '#2e7d32', width: 2 }, label: { formatter: `${averageName} ${formatMeasure(average)}`, position: 'insideStartTop' } }];
  if (input.target !== null) {
    marks.push({ yAxis: input.target, name: 'target', lineStyle: { color: '#c62828', type: 'dashed', width: 2 }, label: { formatter: `target ${formatMeasure(input.target)}`, position: 'insideEndTop' } });
  }
  const shadeBands = pfdView ? input.demand === 'low' : true;
  return {
    animation: false,
    grid: { left: 72, right: 24, top: 24, bottom: 72 },
    tooltip: {
      trigger: 'axis',
      axisPointer: { type: 'cross' },
      valueFormatter: (value: unknown) => formatMeasure(Number(value)),
    },
    xAxis: { type: 'value', name: 'years', nameLocation: 'middle', nameGap: 28, min: 0, max: 'dataMax' },
    yAxis: {
      type: input.logScale ? 'log' : 'value',
      name: pfdView ? 'PFD(t)' : 'w(t) per hour',
      min: input.logScale ? range.min : 0,
      max: input.logScale ? range.max : undefined,
      axisLabel: { formatter: (value: number) => formatMeasure(value) },
    },
    dataZoom: [
      { type: 'inside', xAxisIndex: 0, filterMode: 'none' },
      { type: 'slider', xAxisIndex: 0, filterMode: 'none', bottom: 8 },
    ],
    series: [
      {
        name: pfdView ? 'PFD(t)' : 'w(t)',
        type: 'line',
        data,
        showSymbol: false,
        sampling: 'lttb',
        lineStyle: { width: 1.2, color: '#1f5fbf' },
        markLine: { symbol: 'none', silent: true, data: marks },
        markArea: shadeBands ? { silent: true, data: bandAreas(pfdView ? 'low' : 'high') } : undefined,
      },
    ],
  };
}

export interface BarItem {
  readonly id: string;
  readonly label: string;
  readonly value: number;
}

/** Horizontal bars, largest on top (the weakest-link chart); clicking a bar reports its id in `data.id`. */
export function barChartOptions(items: readonly BarItem[], axisName: string, format: (value: number) => string): EChartsCoreOption {
  const shown = [...items].reverse();
  return {
    animation: false,
    grid: { left: 160, right: 48, top: 8, bottom: 32 },
    tooltip: { trigger: 'item', valueFormatter: (value: unknown) => format(Number(value)) },
    xAxis: { type: 'value', name: axisName, nameLocation: 'middle', nameGap: 24, axisLabel: { formatter: (value: number) => format(value) } },
    yAxis: { type: 'category', data: shown.map((item) => item.label), axisLabel: { width: 150, overflow: 'truncate' } },
    series: [{ type: 'bar', data: shown.map((item) => ({ value: item.value, id: item.id })), itemStyle: { color: '#1f5fbf' }, label: { show: true, position: 'right', formatter: (entry: { value: number }) => format(entry.value) } }],
  };
}

export interface TornadoInput {
  readonly base: number;
  readonly bars: readonly { parameter: string; lowValue: number; highValue: number; lowChange: string; highChange: string }[];
  readonly target: number | null;
}

/** The tornado: for each parameter a bar from its low to its high value around the base, widest on top. */
export function tornadoChartOptions(input: TornadoInput, limit = 12): EChartsCoreOption {
  const shown = input.bars.slice(0, limit).reverse();
  const values = shown.flatMap((bar) => [bar.lowValue, bar.highValue]).concat(input.base, input.target ?? input.base);
  const range = logAxisRange(values);
  return {
    animation: false,
    grid: { left: 220, right: 32, top: 16, bottom: 40 },
    tooltip: { trigger: 'axis', axisPointer: { type: 'shadow' }, valueFormatter: (value: unknown) => formatMeasure(Number(value)) },
    xAxis: { type: 'log', min: range.min, max: range.max, axisLabel: { formatter: (value: number) => formatMeasure(value) } },
    yAxis: { type: 'category', data: shown.map((bar) => bar.parameter), axisLabel: { width: 210, overflow: 'truncate' } },
    series: [
      { name: 'base', type: 'bar', stack: 'range', data: shown.map((bar) => Math.min(bar.lowValue, bar.highValue)), itemStyle: { color: 'transparent' }, tooltip: { show: false } },
      {
        name: 'swing',
        type: 'bar',
        stack: 'range',
        data: shown.map((bar) => Math.max(bar.lowValue, bar.highValue) - Math.min(bar.lowValue, bar.highValue)),
        itemStyle: { color: '#1f5fbf' },
        markLine: {
          symbol: 'none',
          silent: true,
          data: [{ xAxis: input.base, name: 'base', lineStyle: { color: '#2e7d32' } }, ...(input.target !== null ? [{ xAxis: input.target, name: 'target', lineStyle: { color: '#c62828', type: 'dashed' } }] : [])],
        },
      },
    ],
  };
}

export interface SweepInput {
  readonly points: readonly { intervalHours: number; value: number }[];
  readonly target: number | null;
  readonly longestMeetingHours: number | null;
  readonly currentHours: number;
}

/** PFDavg against the proof test interval (months, log axes), the target and the interval that just meets it. */
export function sweepChartOptions(input: SweepInput): EChartsCoreOption {
  const months = (hours: number) => hours / 730;
  const range = logAxisRange([...input.points.map((point) => point.value), ...(input.target !== null ? [input.target] : [])]);
  const marks: object[] = [{ xAxis: months(input.currentHours), name: 'now', lineStyle: { color: '#555' }, label: { formatter: 'current' } }];
  if (input.longestMeetingHours !== null) marks.push({ xAxis: months(input.longestMeetingHours), name: 'meets', lineStyle: { color: '#2e7d32', width: 2 }, label: { formatter: `meets up to ${months(input.longestMeetingHours).toFixed(1)} months` } });
  if (input.target !== null) marks.push({ yAxis: input.target, name: 'target', lineStyle: { color: '#c62828', type: 'dashed' }, label: { formatter: 'target' } });
  return {
    animation: false,
    grid: { left: 72, right: 32, top: 24, bottom: 48 },
    tooltip: { trigger: 'axis', valueFormatter: (value: unknown) => formatMeasure(Number(value)) },
    xAxis: { type: 'log', name: 'proof test interval (months)', nameLocation: 'middle', nameGap: 28 },
    yAxis: { type: 'log', min: range.min, max: range.max, axisLabel: { formatter: (value: number) => formatMeasure(value) } },
    series: [{ type: 'line', data: input.points.map((point) => [months(point.intervalHours), point.value]), showSymbol: true, symbolSize: 4, markLine: { symbol: 'none', silent: true, data: marks } }],
  };
}
