import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { AutoLayout } from '../auto-layout';
import { canvasView } from '../canvas-view';
import { layoutFromElk, layoutGraph } from '../layout-graph';
import { ModelCanvas } from '../model-canvas';
import { layoutKey, withLayout, type EditableModel } from '../model-graph';
import { syntheticFaultTree } from './synthetic-model';

/** Frame-time statistics of a recording, in milliseconds. */
export interface FrameStats {
  readonly frames: number;
  readonly meanMs: number;
  readonly p95Ms: number;
  readonly maxMs: number;
  /** Frames that took longer than two 60 Hz frames (33.4 ms): visible stutter. */
  readonly slowFrames: number;
}

interface BenchApi {
  readonly nodeCount: number;
  readonly layoutMs: readonly number[];
  readonly ready: boolean;
  startFrames(): void;
  stopFrames(): FrameStats;
}

const NODE_COUNT = 300;
const LAYOUT_RUNS = 3;
const GRID_COLUMNS = 20;
/** Longer than two frames at 60 Hz (2 x 16.7 ms). */
const SLOW_FRAME_MS = 33.4;

/**
 * The canvas with a synthetic 300-card fault tree, for scripts/bench-canvas.ts: it times the ELK layout
 * in the worker and records frame times while the script pans, and shows the figures on the page.
 */
@Component({
  selector: 'pl-canvas-bench',
  imports: [ModelCanvas],
  template: `
    <p class="figures" data-bench-figures>
      {{ nodeCount }} cards · ELK layout {{ layoutText() }} · {{ frameText() }}
    </p>
    @if (model(); as current) {
      <pl-model-canvas class="canvas" [model]="current" (edit)="model.set($event)" />
    }
  `,
  styles: `
    :host {
      display: flex;
      flex-direction: column;
      height: 100vh;
    }
    .figures {
      margin: 0;
      padding: 6px 12px;
      font: var(--mat-sys-body-medium);
    }
    .canvas {
      flex: 1 1 auto;
      min-height: 0;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CanvasBench {
  private readonly autoLayout = inject(AutoLayout);

  protected readonly model = signal<EditableModel | null>(null);
  protected readonly layoutText = signal('running…');
  protected readonly frameText = signal('pan to record frame times');
  private readonly layoutRuns: number[] = [];
  private frameTimes: number[] = [];
  private recording = false;
  private ready = false;
  protected nodeCount = 0;

  constructor() {
    void this.run();
    const api: BenchApi = {
      get nodeCount() {
        return bench.nodeCount;
      },
      get layoutMs() {
        return bench.layoutRuns;
      },
      get ready() {
        return bench.ready;
      },
      startFrames: () => this.startFrames(),
      stopFrames: () => this.stopFrames(),
    };
    const bench = this;
    (window as unknown as { plBench: BenchApi }).plBench = api;
  }

  private async run(): Promise<void> {
    const tree = syntheticFaultTree(NODE_COUNT);
    const view = canvasView(tree, []);
    this.nodeCount = view.nodes.length;
    for (let run = 0; run < LAYOUT_RUNS; run++) {
      const start = performance.now();
      const result = await this.autoLayout.layout(layoutGraph(tree, view));
      this.layoutRuns.push(performance.now() - start);
      if (layoutFromElk(view, result)[tree.top] === undefined) throw new Error('the layout lost the top gate');
    }
    this.layoutText.set(this.layoutRuns.map((ms) => `${ms.toFixed(0)} ms`).join(', '));
    // The layered tree is one very wide row of events; for the frame times the cards are shown on a
    // compact grid instead, so that all of them are on screen while panning.
    const grid: Record<string, { x: number; y: number }> = {};
    view.nodes.forEach((node, index) => (grid[layoutKey(node.ref)] = { x: (index % GRID_COLUMNS) * 240, y: Math.floor(index / GRID_COLUMNS) * 160 }));
    this.model.set(withLayout(tree, grid));
    requestAnimationFrame(() => requestAnimationFrame(() => (this.ready = true)));
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
      slowFrames: sorted.filter((value) => value > SLOW_FRAME_MS).length,
    };
    this.frameText.set(`panning: ${stats.frames} frames, mean ${stats.meanMs.toFixed(1)} ms, p95 ${stats.p95Ms.toFixed(1)} ms, max ${stats.maxMs.toFixed(1)} ms, ${stats.slowFrames} over ${SLOW_FRAME_MS} ms`);
    return stats;
  }
}
