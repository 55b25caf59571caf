import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { SolveResult } from '../../../shared/solve-result.js';
import { pfdChartOptions } from './chart-options';

/** The PFD(t) sawtooth (or the PFH view in high demand) with its axis and view switches. */
@Component({
  selector: 'pl-pfd-chart',
  imports: [NgxEchartsDirective, MatButtonToggleGroup, MatButtonToggle],
  template: `
    <div class="switches">
      @if (result().demand !== 'low') {
        <mat-button-toggle-group [value]="view()" (change)="chosenView.set($event.value)" aria-label="Measure shown" hideSingleSelectionIndicator>
          <mat-button-toggle value="pfh">PFH</mat-button-toggle>
          <mat-button-toggle value="pfd">PFD(t)</mat-button-toggle>
        </mat-button-toggle-group>
      }
      <mat-button-toggle-group [value]="logScale() ? 'log' : 'linear'" (change)="logScale.set($event.value === 'log')" aria-label="Vertical axis" hideSingleSelectionIndicator>
        <mat-button-toggle value="log">Log axis</mat-button-toggle>
        <mat-button-toggle value="linear">Linear axis</mat-button-toggle>
      </mat-button-toggle-group>
      <span class="hint">Scroll or drag to zoom and pan; hover for values. {{ result().curve.hours.length.toLocaleString('en-US') }} points.</span>
    </div>
    <div class="chart" echarts [options]="options()" data-pfd-chart role="img" [attr.aria-label]="description()"></div>
  `,
  styles: `
    :host { display: block; }
    .switches { display: flex; flex-wrap: wrap; gap: 12px; align-items: center; margin-bottom: 8px; }
    .hint { color: var(--mat-sys-on-surface-variant); font: var(--mat-sys-body-small); }
    .chart { height: 380px; width: 100%; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PfdChart {
  readonly result = input.required<SolveResult>();
  /** The target on PFDavg (low demand) or PFH, or null. */
  readonly target = input.required<number | null>();

  protected readonly logScale = signal(true);
  protected readonly chosenView = signal<'pfd' | 'pfh' | null>(null);
  protected readonly view = computed(() => this.chosenView() ?? (this.result().demand === 'low' ? 'pfd' : 'pfh'));
  protected readonly options = computed(() => {
    const result = this.result();
    const view = this.view();
    return pfdChartOptions({
      hours: result.curve.hours,
      pfd: result.curve.pfd,
      pfdAvg: result.pfdAvg,
      pfh: result.pfh,
      demand: result.demand,
      target: view === (result.demand === 'low' ? 'pfd' : 'pfh') ? this.target() : null,
      logScale: this.logScale(),
      view,
    });
  });
  protected readonly description = computed(() => `Chart of ${this.view() === 'pfd' ? 'PFD over the mission' : 'PFH over the mission'}`);
}
