import { DestroyRef, Directive, ElementRef, Injectable, effect, inject, input, signal } from '@angular/core';
import type { Size } from './common-cause-bands';

/**
 * The sizes of the cards the common-cause bands wrap, as the browser lays them out (a card's height
 * depends on its figures and messages). One ResizeObserver for the canvas; it reports only when a
 * watched card changes size, never while the view pans or zooms (layout sizes ignore the transform).
 * Provided by the canvas.
 */
@Injectable()
export class CardSizes {
  private readonly sizes = signal<ReadonlyMap<string, Size>>(new Map());
  private readonly ids = new Map<Element, string>();
  private readonly observer = typeof ResizeObserver === 'undefined' ? null : new ResizeObserver((entries) => this.measure(entries.map((entry) => entry.target)));

  /** Measured sizes by canvas node id. */
  readonly measured = this.sizes.asReadonly();

  constructor() {
    inject(DestroyRef).onDestroy(() => this.observer?.disconnect());
  }

  watch(element: HTMLElement, id: string): void {
    this.ids.set(element, id);
    this.observer?.observe(element);
  }

  unwatch(element: HTMLElement): void {
    this.ids.delete(element);
    this.observer?.unobserve(element);
  }

  private measure(elements: readonly Element[]): void {
    let next: Map<string, Size> | null = null;
    for (const element of elements) {
      const id = this.ids.get(element);
      if (id === undefined || !(element instanceof HTMLElement)) continue;
      const size = { width: element.offsetWidth, height: element.offsetHeight };
      const known = (next ?? this.sizes()).get(id);
      if (known?.width === size.width && known.height === size.height) continue;
      next ??= new Map(this.sizes());
      next.set(id, size);
    }
    if (next) this.sizes.set(next);
  }
}

/** Puts a card under CardSizes' watch while `plCardSize` names it (empty: not watched). */
@Directive({ selector: '[plCardSize]' })
export class CardSizeWatch {
  private readonly sizes = inject(CardSizes);
  private readonly element = inject<ElementRef<HTMLElement>>(ElementRef).nativeElement;

  /** The card's canvas id, or '' for a card no band wraps. */
  readonly plCardSize = input.required<string>();

  constructor() {
    effect((onCleanup) => {
      const id = this.plCardSize();
      if (id === '') return;
      this.sizes.watch(this.element, id);
      onCleanup(() => this.sizes.unwatch(this.element));
    });
  }
}
