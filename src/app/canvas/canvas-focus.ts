import { Injectable, signal } from '@angular/core';

/**
 * Which model items other features want the user to look at (the results' weakest link, a review
 * comment's subject). The canvas outlines these items and brings the first into view. Ids are the model
 * file's item ids (an event, gate, common-cause group or state id).
 */
@Injectable({ providedIn: 'root' })
export class CanvasFocus {
  private readonly highlightedIds = signal<readonly string[]>([]);

  readonly highlighted = this.highlightedIds.asReadonly();

  highlight(ids: readonly string[]): void {
    this.highlightedIds.set([...ids]);
  }

  clear(): void {
    this.highlightedIds.set([]);
  }
}
