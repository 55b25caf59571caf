import { logAxisRange, pfdChartOptions, tornadoChartOptions } from './chart-options';

interface LineSeries {
  data: [number, number][];
  sampling: string;
  markLine: { data: { yAxis: number; name: string }[] };
  markArea?: { data: [{ yAxis: number; name: string }, { yAxis: number }][] };
}

describe('chart options', () => {
  const hours = Array.from({ length: 10_000 }, (_, index) => (index / 9_999) * 87_600);
  const pfd = hours.map((t) => 1 - Math.exp(-2e-6 * (t % 8760)));

  it('PFD(t): every point in years, sampled by LTTB, the average and target lines, the four SIL bands of IEC 61508-1:2010 Table 2', () => {
    const options = pfdChartOptions({ hours, pfd, pfdAvg: 8.7e-3, pfh: 0, demand: 'low', target: 1e-2, logScale: true, view: 'pfd' }) as { series: LineSeries[]; yAxis: { type: string }; dataZoom: unknown[] };
    const series = options.series[0];
    expect(series.data).toHaveLength(10_000);
    expect(series.data[9_999][0]).toBeCloseTo(10, 12);
    expect(series.sampling).toBe('lttb');
    expect(series.markLine.data.map((mark) => [mark.name, mark.yAxis])).toEqual([['PFDavg', 8.7e-3], ['target', 1e-2]]);
    expect(series.markArea?.data.map(([from, to]) => [from.name, from.yAxis, to.yAxis])).toEqual([
      ['SIL 4', 1e-5, 1e-4],
      ['SIL 3', 1e-4, 1e-3],
      ['SIL 2', 1e-3, 1e-2],
      ['SIL 1', 1e-2, 1e-1],
    ]);
    expect(options.yAxis.type).toBe('log');
    expect(options.dataZoom).toHaveLength(2);
  });

  it('the PFH view draws w(t) with its average (the PFH) and target lines and the bands of IEC 61508-1:2010 Table 3', () => {
    // w(t) of one untested channel, lambda exp(-lambda t) (the failure density of the exponential law).
    const frequency = hours.map((t) => 2e-7 * Math.exp(-2e-7 * t));
    const options = pfdChartOptions({ hours, pfd, frequency, pfdAvg: 1e-3, pfh: 1.98e-7, demand: 'high', target: 3e-7, logScale: false, view: 'pfh' }) as {
      series: LineSeries[];
      yAxis: { type: string; name: string };
    };
    const series = options.series[0];
    expect(series.data).toHaveLength(10_000);
    expect(series.data[0]).toEqual([0, 2e-7]);
    expect(series.data[9_999][1]).toBeCloseTo(2e-7 * Math.exp(-2e-7 * 87_600), 18);
    expect(series.sampling).toBe('lttb');
    expect(series.markLine.data.map((mark) => [mark.name, mark.yAxis])).toEqual([['PFH', 1.98e-7], ['target', 3e-7]]);
    expect(series.markArea?.data.map(([from, to]) => [from.name, from.yAxis, to.yAxis])).toEqual([
      ['SIL 4', 1e-9, 1e-8],
      ['SIL 3', 1e-8, 1e-7],
      ['SIL 2', 1e-7, 1e-6],
      ['SIL 1', 1e-6, 1e-5],
    ]);
    expect(options.yAxis).toMatchObject({ type: 'value', name: 'w(t) per hour' });
  });

  it('the PFH view of a result without w(t) has no options (no made-up curve); its PFD(t) view has', () => {
    expect(pfdChartOptions({ hours, pfd, pfdAvg: 1e-3, pfh: 2e-7, demand: 'high', target: 3e-7, logScale: true, view: 'pfh' })).toBeNull();
    const pfdView = pfdChartOptions({ hours, pfd, pfdAvg: 1e-3, pfh: 2e-7, demand: 'high', target: null, logScale: true, view: 'pfd' }) as { series: LineSeries[] };
    // In high demand PFD(t) is shown for information: the low-demand bands would not apply to it.
    expect(pfdView.series[0].markArea).toBeUndefined();
  });

  it('log axis range spans whole decades around the values', () => {
    expect(logAxisRange([2e-4, 8e-3])).toEqual({ min: 1e-4, max: 1e-1 });
    expect(logAxisRange([0])).toEqual({ min: 1e-6, max: 1 });
  });

  it('tornado bars stack an invisible start and the swing, widest parameter on top', () => {
    const options = tornadoChartOptions({
      base: 1e-3,
      target: null,
      bars: [
        { parameter: 'wide', lowValue: 5e-4, highValue: 2e-3, lowChange: '/ 2', highChange: 'x 2' },
        { parameter: 'narrow', lowValue: 9e-4, highValue: 1.1e-3, lowChange: '/ 2', highChange: 'x 2' },
      ],
    }) as { yAxis: { data: string[] }; series: { data: number[] }[] };
    expect(options.yAxis.data).toEqual(['narrow', 'wide']);
    expect(options.series[0].data).toEqual([9e-4, 5e-4]);
    expect(options.series[1].data[1]).toBeCloseTo(1.5e-3, 15);
  });
});
