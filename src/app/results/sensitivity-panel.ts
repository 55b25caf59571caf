import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { ModelFile } from '../../../shared/model-file.js';
import type { MeasureTarget } from '../../../solver/analysis/evaluate-measure.js';
import { referenceInterval } from '../../../solver/analysis/sensitivity.js';
import { sweepChartOptions, tornadoChartOptions } from './chart-options';
import { SensitivityRunner } from './sensitivity-runner';
import { formatMeasure, formatPercent } from './verdict';

/** Sensitivity (interval sweep, tornado) and failure-rate uncertainty of the solved model (fault tree or state model), run on request. */
@Component({
  selector: 'pl-sensitivity-panel',
  imports: [FormsModule, MatButton, MatFormField, MatLabel, MatInput, MatProgressBar, NgxEchartsDirective],
  providers: [SensitivityRunner],
  templateUrl: './sensitivity-panel.html',
  styleUrl: './sensitivity-panel.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SensitivityPanel {
  protected readonly runner = inject(SensitivityRunner);

  readonly model = input.required<ModelFile>();
  readonly target = input.required<MeasureTarget | null>();
  readonly measureName = input.required<string>();

  protected readonly factor = signal(2);
  protected readonly samples = signal(300);
  protected readonly seed = signal(1);
  protected readonly formatMeasure = formatMeasure;
  protected readonly formatPercent = formatPercent;

  protected readonly settingsProblem = computed(() => {
    if (!(this.factor() > 1 && this.factor() <= 100)) return 'The tornado factor must be above 1 and at most 100.';
    if (!Number.isInteger(this.samples()) || this.samples() < 10 || this.samples() > 100_000) return 'Samples must be a whole number from 10 to 100000.';
    if (!Number.isInteger(this.seed()) || this.seed() < 0) return 'The seed must be a whole number, 0 or more.';
    return null;
  });

  protected readonly sweepOptions = computed(() => {
    const sweep = this.runner.sweep();
    if (!sweep) return null;
    return sweepChartOptions({ points: sweep.points, target: this.target()?.limit ?? null, longestMeetingHours: sweep.longestMeetingHours, currentHours: referenceInterval(this.model()) ?? sweep.referenceHours });
  });

  protected readonly tornadoOptions = computed(() => {
    const result = this.runner.tornado();
    return result ? tornadoChartOptions({ base: result.base, bars: result.bars, target: this.target()?.limit ?? null }) : null;
  });

  constructor() {
    inject(DestroyRef).onDestroy(() => this.runner.stop());
  }

  protected run(): void {
    const target = this.target() ?? { limit: Number.POSITIVE_INFINITY, inclusive: true };
    void this.runner.run(this.model(), target, { tornadoFactor: this.factor(), samples: this.samples(), seed: this.seed() });
  }

  protected months(hours: number): string {
    return `${(hours / 730).toFixed(1)} months`;
  }
}
