import { ChangeDetectionStrategy, Component, ErrorHandler, computed, effect, inject, input, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Title } from '@angular/platform-browser';
import { Router, RouterLink } from '@angular/router';
import * as echarts from 'echarts/core';
import { BarChart, LineChart } from 'echarts/charts';
import { DataZoomComponent, GridComponent, MarkAreaComponent, MarkLineComponent, TooltipComponent } from 'echarts/components';
import { CanvasRenderer } from 'echarts/renderers';
import { NgxEchartsDirective, provideEchartsCore } from 'ngx-echarts';
import { isResultFigure } from '../../../shared/api/annotations.js';
import { RESULT_TABLES, type ResultAnalysis, type ResultTable } from '../../../shared/api/results.js';
import type { Solve } from '../../../shared/api/solves.js';
import type { SolveResult } from '../../../shared/solve-result.js';
import { CanvasFocus } from '../canvas/canvas-focus';
import { barChartOptions } from './chart-options';
import { FigureComments } from './figure-comments';
import { FigureThreads } from './figure-threads';
import { MonteCarloCheck } from './monte-carlo-check';
import { PfdChart } from './pfd-chart';
import { ResultRecords } from './result-records';
import { contributionRows, cutSetRows, importanceRows, itemLabels, type ImportanceKey } from './result-tables';
import { SensitivityPanel } from './sensitivity-panel';
import { formatMeasure, formatPercent, methodRows, validityWarnings, verdictOf } from './verdict';

echarts.use([LineChart, BarChart, GridComponent, TooltipComponent, DataZoomComponent, MarkAreaComponent, MarkLineComponent, CanvasRenderer]);

const TABLE_LABELS: Record<ResultTable, string> = {
  curve: 'PFD(t) curve',
  'cut-sets': 'Cut sets',
  importance: 'Importance',
  contributions: 'Contributions',
  constraints: 'Constraints',
};

interface Loaded {
  readonly solve: Solve;
  readonly result: SolveResult;
  readonly analysis: ResultAnalysis;
}

/**
 * The results workspace of one solve: the verdict with the methods side by side, the PFD(t) chart, the
 * weakest link, the architectural constraints and the SIL claim, spurious trips, sensitivity and
 * uncertainty, and the report downloads. Clicking an item shows it on the model canvas (CanvasFocus).
 * Each figure carries its review comments (FigureComments) when the solve is of an issued revision;
 * ?figure=<id> unfolds that figure's comments on arrival.
 */
@Component({
  selector: 'pl-results-page',
  imports: [RouterLink, MatButton, MatIcon, MatProgressBar, NgxEchartsDirective, PfdChart, SensitivityPanel, MonteCarloCheck, FigureComments],
  providers: [provideEchartsCore({ echarts }), FigureThreads],
  templateUrl: './results-page.html',
  styleUrl: './results-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResultsPage {
  private readonly records = inject(ResultRecords);
  private readonly focus = inject(CanvasFocus);
  private readonly snackBar = inject(MatSnackBar);
  private readonly router = inject(Router);
  private readonly title = inject(Title);
  private readonly errorHandler = inject(ErrorHandler);
  protected readonly figureThreads = inject(FigureThreads);

  readonly projectId = input.required<string>();
  readonly sifId = input.required<string>();
  readonly modelId = input.required<string>();
  readonly solveId = input.required<string>();
  /** A result figure whose review comments to unfold (from the review panel's link). */
  readonly figure = input<string | undefined>(undefined);

  protected readonly loaded = signal<Loaded | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly importanceSort = signal<ImportanceKey>('fussellVesely');
  protected readonly formatMeasure = formatMeasure;
  protected readonly formatPercent = formatPercent;
  protected readonly tables = RESULT_TABLES.map((table) => ({ table, label: TABLE_LABELS[table] }));

  protected readonly verdict = computed(() => {
    const loaded = this.loaded();
    return loaded ? verdictOf(loaded.result, loaded.analysis.sif.derivedTarget) : null;
  });
  protected readonly methods = computed(() => {
    const loaded = this.loaded();
    return loaded ? methodRows(loaded.result, loaded.analysis.methods, loaded.solve.id) : [];
  });
  protected readonly warnings = computed(() => {
    const loaded = this.loaded();
    return loaded ? [...validityWarnings(loaded.result), ...loaded.analysis.notes] : [];
  });
  private readonly labels = computed(() => {
    const loaded = this.loaded();
    return loaded ? itemLabels(loaded.analysis.model) : new Map<string, string>();
  });
  protected readonly contributions = computed(() => {
    const loaded = this.loaded();
    return loaded ? contributionRows(loaded.result, loaded.analysis.constraints ?? [], this.labels()) : [];
  });
  protected readonly cutSets = computed(() => {
    const loaded = this.loaded();
    return loaded ? cutSetRows(loaded.result) : [];
  });
  protected readonly importance = computed(() => {
    const loaded = this.loaded();
    return loaded ? importanceRows(loaded.result, this.labels(), this.importanceSort()) : [];
  });
  protected readonly weakestLinkOptions = computed(() => {
    const rows = this.contributions().filter((row) => row.kind !== 'subsystem').slice(0, 12);
    return barChartOptions(
      rows.map((row) => ({ id: row.id, label: row.label === row.id ? row.id : `${row.id} ${row.label}`, value: row.share })),
      'share of PFDavg (Fussell-Vesely)',
      (value) => formatPercent(value),
    );
  });
  protected readonly measureTarget = computed(() => {
    const verdict = this.verdict();
    return verdict && verdict.target !== null ? { limit: verdict.target, inclusive: verdict.limitInclusive } : null;
  });
  protected readonly modelLink = computed(() => ['/projects', this.projectId(), 'sifs', this.sifId(), 'models', this.modelId()]);
  protected readonly reportUrl = computed(() => this.records.reportUrl(this.projectId(), this.solveId()));

  constructor() {
    effect(() => void this.load(this.projectId(), this.solveId()));
  }

  protected csvUrl(table: ResultTable): string {
    return this.records.csvUrl(this.projectId(), this.solveId(), table);
  }

  /** Highlights model items on the canvas and offers to open it. */
  protected show(ids: readonly string[]): void {
    const shown = ids.filter((id) => this.labels().has(id));
    if (shown.length === 0) return;
    this.focus.highlight(shown);
    const reference = this.snackBar.open(`Highlighted ${shown.join(', ')} on the model canvas`, 'Open canvas', { duration: 5000 });
    reference.onAction().subscribe(() => void this.router.navigate(this.modelLink()));
  }

  protected onBarClick(event: { data?: unknown }): void {
    const data = event.data as { id?: string } | undefined;
    if (data?.id) this.show([data.id]);
  }

  /** Reads the analysis again (a Monte Carlo check of the same content finished); the solve is unchanged. */
  protected async reloadAnalysis(): Promise<void> {
    const current = this.loaded();
    if (!current) return;
    try {
      const analysis = await this.records.analysis(this.projectId(), current.solve.id);
      if (this.loaded() === current) this.loaded.set({ ...current, analysis });
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  private async load(projectId: string, solveId: string): Promise<void> {
    this.problem.set(null);
    try {
      const solve = await this.records.solve(projectId, solveId);
      if (solve.status !== 'succeeded' || !solve.result) {
        this.problem.set(solve.status === 'failed' ? `This solve failed: ${solve.error ?? 'no reason given'}` : `This solve has no result yet (it is ${solve.status}).`);
        return;
      }
      const analysis = await this.records.analysis(projectId, solveId);
      this.loaded.set({ solve, result: solve.result, analysis });
      this.title.setTitle(`Results ${analysis.sif.tag} · Proofline`);
      const figure = this.figure() ?? null;
      if (isResultFigure(figure)) this.figureThreads.open(figure);
      await this.figureThreads.load(projectId, solve.modelId, solve.revisionNumber, solve.id);
    } catch (error) {
      this.problem.set('The results could not be loaded.');
      this.errorHandler.handleError(error);
    }
  }
}
