import { ChangeDetectionStrategy, Component, ErrorHandler, computed, effect, inject, input, output, signal, untracked } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import type { MethodResult } from '../../../shared/api/results.js';
import type { Solve, SolveSource } from '../../../shared/api/solves.js';
import type { SolveResult } from '../../../shared/solve-result.js';
import { isApiError } from '../errors/api-error';
import { SolveRunner } from '../models/solve-runner';
import { formatMeasure, formatPercent, monteCarloAgreement } from './verdict';

/** Bounds of the solve API's settings (shared/api/solves.ts solveSettings). */
const MIN_SAMPLES = 100;
const MAX_SAMPLES = 10_000_000;

/**
 * The Monte Carlo check of the solved content: starts a Monte Carlo solve of the same source (the draft
 * version or the revision that was solved) through the solve API, follows its progress with a cancel,
 * and shows the simulated PFDavg and PFH with their 99 % intervals and whether the exact value lies
 * inside. Emits `checked` with the Monte Carlo solve's id when it succeeded, so the page reloads the
 * methods side by side.
 */
@Component({
  selector: 'pl-monte-carlo-check',
  imports: [FormsModule, MatButton, MatFormField, MatLabel, MatInput, MatIcon, MatProgressBar],
  providers: [SolveRunner],
  templateUrl: './monte-carlo-check.html',
  styleUrl: './monte-carlo-check.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MonteCarloCheck {
  protected readonly runner = inject(SolveRunner);
  private readonly errorHandler = inject(ErrorHandler);

  readonly projectId = input.required<string>();
  /** The solve whose results are shown: its model and source are simulated. */
  readonly solve = input.required<Solve>();
  readonly modelKind = input.required<'fault-tree' | 'markov'>();
  readonly demand = input.required<SolveResult['demand']>();
  readonly methods = input.required<readonly MethodResult[]>();
  readonly checked = output<string>();

  protected readonly samples = signal(100_000);
  protected readonly seed = signal(1);
  protected readonly problem = signal<string | null>(null);
  protected readonly formatMeasure = formatMeasure;
  protected readonly formatPercent = formatPercent;

  protected readonly agreement = computed(() => monteCarloAgreement(this.methods(), this.demand()));
  protected readonly progressPercent = computed(() => Math.round(this.runner.progress() * 100));
  protected readonly settingsProblem = computed(() => {
    const samples = this.samples();
    if (!Number.isInteger(samples) || samples < MIN_SAMPLES || samples > MAX_SAMPLES) return `Missions must be a whole number from ${MIN_SAMPLES} to ${MAX_SAMPLES}.`;
    const seed = this.seed();
    if (!Number.isInteger(seed) || seed < 0 || seed > 2 ** 31 - 1) return 'The seed must be a whole number from 0 to 2147483647.';
    return null;
  });
  private reported: string | null = null;

  constructor() {
    effect(() => {
      const current = this.runner.solve();
      if (current?.status !== 'succeeded' || current.id === this.reported) return;
      this.reported = current.id;
      untracked(() => this.checked.emit(current.id));
    });
  }

  protected async start(): Promise<void> {
    if (this.runner.running() || this.settingsProblem() !== null) return;
    const solved = this.solve();
    const source: SolveSource = solved.revisionNumber !== null ? { kind: 'revision', number: solved.revisionNumber } : { kind: 'draft', version: solved.draftVersion ?? 1 };
    this.problem.set(null);
    try {
      await this.runner.start(this.projectId(), solved.modelId, source, { method: 'montecarlo', timePoints: solved.settings.timePoints, samples: this.samples(), seed: this.seed() });
    } catch (error) {
      if (isApiError(error, 409) && error.code === 'version_conflict') {
        this.problem.set(
          `The draft has changed since this solve (which was of draft version ${solved.draftVersion}). The check must simulate the same content: solve the draft again and run the check from its results.`,
        );
      } else if (isApiError(error) && error.status >= 400 && error.status < 500) {
        this.problem.set(`The check could not start: ${error.message}.`);
      } else {
        this.problem.set('The check could not start.');
        this.errorHandler.handleError(error);
      }
    }
  }
}
