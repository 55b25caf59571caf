import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { SolveResult } from '../../../shared/solve-result.js';
import { pfdChartOptions } from './chart-options';
import { formatMeasure } from './verdict';

/**
 * The PFD(t) sawtooth or the PFH view (w(t) with its average), with the axis and view switches. The PFH
 * view is shown first in high and continuous demand, where PFH is the measure (IEC 61508-1:2010 Table 3);
 * a result without w(t) says so in the chart's place.
 */
@Component({
  selector: 'pl-pfd-chart',
  imports: [NgxEchartsDirective, MatButtonToggleGroup, MatButtonToggle],
  template: `
    <div class="switches">
      <mat-button-toggle-group [value]="view()" (change)="chosenView.set($event.value)" aria-label="Measure shown" hideSingleSelectionIndicator>
        <mat-button-toggle value="pfd">PFD(t)</mat-button-toggle>
        <mat-button-toggle value="pfh" data-pfh-view>PFH: w(t)</mat-button-toggle>
      </mat-button-toggle-group>
      <mat-button-toggle-group [value]="logScale() ? 'log' : 'linear'" (change)="logScale.set($event.value === 'log')" aria-label="Vertical axis" hideSingleSelectionIndicator>
        <mat-button-toggle value="log">Log axis</mat-button-toggle>
        <mat-button-toggle value="linear">Linear axis</mat-button-toggle>
      </mat-button-toggle-group>
      <span class="hint">Scroll or drag to zoom and pan; hover for values. {{ result().curve.hours.length.toLocaleString('en-US') }} points.</span>
    </div>
    @if (options(); as chartOptions) {
      <div class="chart" echarts [options]="chartOptions" data-pfd-chart [attr.data-view]="view()" role="img" [attr.aria-label]="description()"></div>
    } @else {
      <p class="no-curve" data-no-frequency role="note">
        This result has no failure frequency curve w(t): the engine that produced it does not compute one, so there is nothing to draw.
        Its PFH, the average failure frequency over the mission, is {{ formatMeasure(result().pfh) }} per hour.
      </p>
    }
  `,
  styles: `
    :host { display: block; }
    .switches { display: flex; flex-wrap: wrap; gap: 12px; align-items: center; margin-bottom: 8px; }
    .hint { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-small); }
    .chart { height: 380px; width: 100%; }
    .no-curve { min-height: 120px; display: flex; align-items: center; padding: 0 16px; border: 1px dashed var(--mat-sys-outline-variant); border-radius: 8px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PfdChart {
  readonly result = input.required<SolveResult>();
  /** The target on PFDavg (low demand) or PFH, or null. */
  readonly target = input.required<number | null>();

  protected readonly formatMeasure = formatMeasure;
  protected readonly logScale = signal(true);
  protected readonly chosenView = signal<'pfd' | 'pfh' | null>(null);
  protected readonly view = computed(() => this.chosenView() ?? (this.result().demand === 'low' ? 'pfd' : 'pfh'));
  protected readonly options = computed(() => {
    const result = this.result();
    const view = this.view();
    return pfdChartOptions({
      hours: result.curve.hours,
      pfd: result.curve.pfd,
      frequency: result.curve.frequency,
      pfdAvg: result.pfdAvg,
      pfh: result.pfh,
      demand: result.demand,
      target: view === (result.demand === 'low' ? 'pfd' : 'pfh') ? this.target() : null,
      logScale: this.logScale(),
      view,
    });
  });
  protected readonly description = computed(() => (this.view() === 'pfd' ? 'Chart of PFD(t) over the mission' : 'Chart of the failure frequency w(t) and the PFH over the mission'));
}
