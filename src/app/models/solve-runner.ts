import { ErrorHandler, Injectable, computed, inject, signal } from '@angular/core';
import { FINISHED_SOLVE_STATUSES, solve, solveProgressEvent, solveSummary, type Solve, type SolveSettingsInput, type SolveSource, type SolveSummary } from '../../../shared/api/solves.js';
import { ModelRecords, solveEventsUrl } from './model-records';

/**
 * Starts a solve (of the draft or of a revision, exact or Monte Carlo) and follows it through its
 * server-sent events (status, progress, done) until it finishes or the user cancels it. Provided by the
 * editor page and by the results page's Monte Carlo check.
 */
@Injectable()
export class SolveRunner {
  private readonly records = inject(ModelRecords);
  private readonly errorHandler = inject(ErrorHandler);

  private readonly current = signal<SolveSummary | null>(null);
  private readonly fraction = signal(0);
  private readonly stageText = signal<string | null>(null);
  private readonly cancelling = signal(false);
  private source: EventSource | null = null;
  private projectId = '';

  readonly solve = this.current.asReadonly();
  readonly progress = this.fraction.asReadonly();
  readonly stage = this.stageText.asReadonly();
  readonly cancelRequested = this.cancelling.asReadonly();
  readonly running = computed(() => {
    const current = this.current();
    return current !== null && !FINISHED_SOLVE_STATUSES.includes(current.status);
  });
  /** The id of the last solve that succeeded, for the results view. */
  readonly finishedId = computed(() => (this.current()?.status === 'succeeded' ? this.current()!.id : null));

  /** The default settings (exact) unless `settings` says otherwise. */
  async start(projectId: string, modelId: string, source: SolveSource, settings?: SolveSettingsInput): Promise<void> {
    this.stop();
    this.projectId = projectId;
    this.cancelling.set(false);
    this.fraction.set(0);
    this.stageText.set('queued');
    const started = await this.records.startSolve(projectId, modelId, settings ? { source, settings } : { source });
    this.update(started);
    if (!FINISHED_SOLVE_STATUSES.includes(started.status)) this.follow(started.id);
  }

  async cancel(): Promise<void> {
    const current = this.current();
    if (!current || !this.running()) return;
    this.cancelling.set(true);
    try {
      this.update(await this.records.cancelSolve(this.projectId, current.id));
    } catch (error) {
      this.cancelling.set(false);
      this.errorHandler.handleError(error);
    }
  }

  /** Stops listening (the page is closing); the solve itself goes on on the server. */
  stop(): void {
    this.source?.close();
    this.source = null;
  }

  private follow(solveId: string): void {
    const source = new EventSource(solveEventsUrl(this.projectId, solveId));
    this.source = source;
    source.addEventListener('status', (event) => {
      const parsed = solveSummary.safeParse(JSON.parse((event as MessageEvent<string>).data));
      if (parsed.success) this.update(parsed.data);
    });
    source.addEventListener('progress', (event) => {
      const parsed = solveProgressEvent.safeParse(JSON.parse((event as MessageEvent<string>).data));
      if (parsed.success) {
        this.fraction.set(parsed.data.progress);
        this.stageText.set(parsed.data.stage);
      }
    });
    source.addEventListener('done', (event) => {
      const parsed = solve.safeParse(JSON.parse((event as MessageEvent<string>).data));
      if (parsed.success) this.update(parsed.data);
      else this.errorHandler.handleError(new Error(`The finished solve did not have the expected shape: ${parsed.error.message}`));
      this.stop();
    });
    source.addEventListener('error', () => {
      // EventSource reconnects by itself while the stream is open; once closed there is nothing to follow.
      if (source.readyState === EventSource.CLOSED && this.running()) {
        this.errorHandler.handleError(new Error('The connection to the solve was lost. Reload the page to see its outcome.'));
      }
    });
  }

  private update(next: SolveSummary | Solve): void {
    this.current.set(next);
    this.fraction.set(next.status === 'succeeded' ? 1 : next.progress);
    this.stageText.set(next.stage);
  }
}
