import { ChangeDetectionStrategy, Component, computed, signal } from '@angular/core';
import * as echarts from 'echarts/core';
import { LineChart } from 'echarts/charts';
import { DataZoomComponent, GridComponent, MarkAreaComponent, MarkLineComponent, TooltipComponent } from 'echarts/components';
import { CanvasRenderer } from 'echarts/renderers';
import { NgxEchartsDirective, provideEchartsCore } from 'ngx-echarts';
import { pfdChartOptions } from '../chart-options';
import { syntheticResult } from './synthetic-result';

echarts.use([LineChart, GridComponent, TooltipComponent, DataZoomComponent, MarkAreaComponent, MarkLineComponent, CanvasRenderer]);

/** Frame-time statistics of a recording, in milliseconds. */
export interface FrameStats {
  readonly frames: number;
  readonly meanMs: number;
  readonly p95Ms: number;
  readonly maxMs: number;
}

interface ChartBenchApi {
  readonly points: number;
  readonly variant: string;
  /** From the page's creation (building the options included) until ECharts' first 'finished' event; null until then. */
  readonly firstRenderMs: number | null;
  startFrames(): void;
  stopFrames(): FrameStats;
}

const POINTS = 10_000;

/**
 * The results chart with a synthetic 10,000-point curve, for scripts/bench-chart.ts: the same options as
 * the results page (chart-options.ts pfdChartOptions), timed from the page's creation to ECharts' first
 * finished render, and frame times recorded while the script zooms and pans. `?variant=unsampled` drops
 * the LTTB sampling, to show what it buys.
 */
@Component({
  selector: 'pl-chart-bench',
  imports: [NgxEchartsDirective],
  providers: [provideEchartsCore({ echarts })],
  template: `
    <p class="figures" data-bench-figures>{{ points }} points ({{ variant }}) · first render {{ firstText() }} · {{ frameText() }}</p>
    <div class="chart" echarts [options]="options" (chartFinished)="finished()"></div>
  `,
  styles: `
    :host { display: block; padding: 16px; }
    .figures { margin: 0 0 8px; font: var(--mat-sys-body-medium); }
    .chart { height: 380px; width: 1200px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ChartBench {
  private readonly createdAt = performance.now();
  protected readonly points = POINTS;
  protected readonly variant = new URLSearchParams(location.search).get('variant') === 'unsampled' ? 'unsampled' : 'as shipped';
  protected readonly options = this.buildOptions();
  private readonly firstRender = signal<number | null>(null);
  protected readonly firstText = computed(() => (this.firstRender() === null ? 'running…' : `${this.firstRender()!.toFixed(0)} ms`));
  protected readonly frameText = signal('zoom or pan to record frame times');
  private frameTimes: number[] = [];
  private recording = false;

  constructor() {
    const api: ChartBenchApi = {
      points: POINTS,
      variant: this.variant,
      get firstRenderMs() {
        return bench.firstRender();
      },
      startFrames: () => this.startFrames(),
      stopFrames: () => this.stopFrames(),
    };
    const bench = this;
    (window as unknown as { plChartBench: ChartBenchApi }).plChartBench = api;
  }

  protected finished(): void {
    if (this.firstRender() === null) this.firstRender.set(performance.now() - this.createdAt);
  }

  private buildOptions() {
    const result = syntheticResult(POINTS);
    const options = pfdChartOptions({ hours: result.curve.hours, pfd: result.curve.pfd, frequency: result.curve.frequency, pfdAvg: result.pfdAvg, pfh: result.pfh, demand: 'low', target: 1e-2, logScale: true, view: 'pfd' }) as {
      series: Record<string, unknown>[];
    };
    if (this.variant === 'unsampled') for (const series of options.series) delete series['sampling'];
    return options;
  }

  private startFrames(): void {
    this.frameTimes = [];
    this.recording = true;
    let last = performance.now();
    const tick = (now: number): void => {
      if (!this.recording) return;
      this.frameTimes.push(now - last);
      last = now;
      requestAnimationFrame(tick);
    };
    requestAnimationFrame(tick);
  }

  private stopFrames(): FrameStats {
    this.recording = false;
    const sorted = [...this.frameTimes.slice(1)].sort((a, b) => a - b);
    const stats: FrameStats = {
      frames: sorted.length,
      meanMs: sorted.reduce((sum, value) => sum + value, 0) / Math.max(1, sorted.length),
      p95Ms: sorted[Math.min(sorted.length - 1, Math.floor(sorted.length * 0.95))] ?? 0,
      maxMs: sorted[sorted.length - 1] ?? 0,
    };
    this.frameText.set(`${stats.frames} frames, mean ${stats.meanMs.toFixed(1)} ms, p95 ${stats.p95Ms.toFixed(1)} ms`);
    return stats;
  }
}
