import { Injectable, computed, signal } from '@angular/core';
import type { Annotation, AnnotationSeverity } from '../../../shared/api/annotations.js';

/** What one item's marker on the canvas shows: its threads, the most pressing open severity, whether any is outdated. */
export interface Pin {
  /** The item key, e.g. "gate:TOP", "state:pump/OK", "transition:OK->FAILED" (shared/model-diff itemKey). */
  readonly key: string;
  readonly count: number;
  readonly openCount: number;
  /** The highest severity among the open threads; null once all are resolved. */
  readonly severity: AnnotationSeverity | null;
  readonly outdated: boolean;
  /** The thread a click opens: the first open one, else the first. */
  readonly firstThreadId: string;
}

const RANK: Record<AnnotationSeverity, number> = { question: 0, remark: 1, 'must-fix': 2 };

/** Item kinds a marker is drawn on; threads on the whole model or a result figure have no canvas item. */
const CANVAS_KINDS: ReadonlySet<string> = new Set(['gate', 'event', 'ccf', 'state', 'transition']);

/** Result figures ("result:pfdAvg", "result:cut-set:A+B") have their pins on the results page. */
export const RESULT_KINDS: ReadonlySet<string> = new Set(['result']);

/** The pins of a list of threads, one per annotated item of the given kinds, in the order the threads come. */
export function pinsOf(threads: readonly Annotation[], kinds: ReadonlySet<string> = CANVAS_KINDS): ReadonlyMap<string, Pin> {
  const pins = new Map<string, Pin>();
  for (const thread of threads) {
    if (!kinds.has(thread.target.kind) || thread.target.itemId === null) continue;
    const key = `${thread.target.kind}:${thread.target.itemId}`;
    const before = pins.get(key);
    const open = thread.status === 'open';
    const higher = before === undefined || before.severity === null || RANK[thread.severity] > RANK[before.severity];
    const severity = open && higher ? thread.severity : (before?.severity ?? null);
    pins.set(key, {
      key,
      count: (before?.count ?? 0) + 1,
      openCount: (before?.openCount ?? 0) + (open ? 1 : 0),
      severity,
      outdated: (before?.outdated ?? false) || thread.outdated,
      firstThreadId: before && (before.openCount > 0 || !open) ? before.firstThreadId : thread.id,
    });
  }
  return pins;
}

/** The words a marker says to a screen reader and in its tooltip; `pinned` is what the threads are on ("item", "figure"). */
export function pinLabel(pin: Pin, action = 'open in the review panel', pinned = 'item'): string {
  const threads = `${pin.count} annotation${pin.count === 1 ? '' : 's'}`;
  const state = pin.openCount === 0 ? 'all resolved' : `${pin.openCount} open, highest ${pin.severity}`;
  return `${threads} (${state}${pin.outdated ? `, outdated: the ${pinned} changed since` : ''}); ${action}`;
}

/**
 * The review panel's threads as pins on the canvas, and the way back: a click on a marker asks the panel to
 * open that item's thread. The panel publishes; the canvas markers only read.
 */
@Injectable({ providedIn: 'root' })
export class ReviewPins {
  private readonly threads = signal<readonly Annotation[]>([]);
  private readonly requestedThread = signal<{ readonly threadId: string } | null>(null);

  readonly pins = computed(() => pinsOf(this.threads()));
  /** A new object on every click, so clicking the same marker twice opens it again. */
  readonly requested = this.requestedThread.asReadonly();

  show(threads: readonly Annotation[]): void {
    this.threads.set(threads);
  }

  clear(): void {
    this.threads.set([]);
    this.requestedThread.set(null);
  }

  open(key: string): void {
    const pin = this.pins().get(key);
    if (pin) this.requestedThread.set({ threadId: pin.firstThreadId });
  }
}
