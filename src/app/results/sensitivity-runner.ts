import { Injectable, computed, signal } from '@angular/core';
import type { ModelFile } from '../../../shared/model-file.js';
import type { MeasureTarget } from '../../../solver/analysis/evaluate-measure.js';
import { intervalSweep, referenceInterval, tornado, type IntervalSweep, type Tornado } from '../../../solver/analysis/sensitivity.js';
import { rateUncertainty, type UncertaintyResult } from '../../../solver/analysis/uncertainty.js';

/** Longest stretch of solving before the runner lets the page paint (ms). */
const SLICE_MS = 40;

export interface SensitivitySettings {
  readonly tornadoFactor: number;
  readonly samples: number;
  readonly seed: number;
}

/**
 * Runs the sensitivity sweep, the tornado and the rate uncertainty of a fault tree or a state model in the browser
 * (solver/analysis). Why here and not on the server: each run is a few hundred solves of one small
 * model (under a millisecond to a few milliseconds each for a SIF-sized tree or chain), it needs no database, and
 * running it here keeps the API thread and the shared solver processes free. The work is cut into
 * slices of about 40 ms with a yield between, so the page stays responsive; the user can stop it.
 * Provided by the results page.
 */
@Injectable()
export class SensitivityRunner {
  private readonly state = signal<'idle' | 'running' | 'done' | 'stopped' | 'failed'>('idle');
  private readonly stageText = signal('');
  private readonly fraction = signal(0);
  private readonly sweepResult = signal<IntervalSweep | null>(null);
  private readonly tornadoResult = signal<Tornado | null>(null);
  private readonly uncertaintyResult = signal<UncertaintyResult | null>(null);
  private readonly failure = signal<string | null>(null);
  private controller: AbortController | null = null;

  readonly status = this.state.asReadonly();
  readonly stage = this.stageText.asReadonly();
  readonly progress = this.fraction.asReadonly();
  readonly sweep = this.sweepResult.asReadonly();
  readonly tornado = this.tornadoResult.asReadonly();
  readonly uncertainty = this.uncertaintyResult.asReadonly();
  readonly error = this.failure.asReadonly();
  readonly running = computed(() => this.state() === 'running');

  async run(model: ModelFile, target: MeasureTarget, settings: SensitivitySettings): Promise<void> {
    this.stop();
    const controller = new AbortController();
    this.controller = controller;
    this.state.set('running');
    this.failure.set(null);
    this.sweepResult.set(null);
    this.tornadoResult.set(null);
    this.uncertaintyResult.set(null);
    let sliceStart = performance.now();
    const pause = async () => {
      if (performance.now() - sliceStart < SLICE_MS) return;
      await new Promise((resolve) => setTimeout(resolve, 0));
      sliceStart = performance.now();
    };
    const stepOf = (offset: number, weight: number) => (done: number) => this.fraction.set(offset + weight * done);
    const options = { signal: controller.signal, pause };
    try {
      if (referenceInterval(model) !== undefined) {
        this.stageText.set('proof test interval sweep');
        this.sweepResult.set(await intervalSweep(model, { ...options, target, onProgress: stepOf(0, 0.2) }));
      }
      this.stageText.set('tornado');
      this.tornadoResult.set(await tornado(model, { ...options, factor: settings.tornadoFactor, onProgress: stepOf(0.2, 0.2) }));
      this.stageText.set('failure-rate uncertainty');
      this.uncertaintyResult.set(await rateUncertainty(model, { ...options, target, samples: settings.samples, seed: settings.seed, onProgress: stepOf(0.4, 0.6) }));
      this.fraction.set(1);
      this.state.set('done');
    } catch (error) {
      if (controller.signal.aborted) {
        this.state.set('stopped');
      } else {
        this.failure.set(error instanceof Error ? error.message : String(error));
        this.state.set('failed');
      }
    } finally {
      if (this.controller === controller) this.controller = null;
    }
  }

  stop(): void {
    this.controller?.abort(new Error('stopped by the user'));
    this.controller = null;
  }
}
