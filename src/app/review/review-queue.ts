import { ChangeDetectionStrategy, Component, ErrorHandler, inject, signal } from '@angular/core';
import { MatSlideToggle } from '@angular/material/slide-toggle';
import { RouterLink } from '@angular/router';
import type { ReviewRound } from '../../../shared/api/reviews.js';
import { ReviewDesk } from './review-desk';

/** The reviews waiting for me, and my switch for e-mail notices. */
@Component({
  selector: 'pl-review-queue',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatSlideToggle],
  template: `
    <section class="page">
      <h1>Reviews waiting for me</h1>
      <ul class="rounds" aria-label="Review queue">
        @for (round of rounds(); track round.id) {
          <li data-queue-round>
            <a [routerLink]="['/projects', round.projectId, 'sifs', round.sifId, 'models', round.modelId]">{{ round.sifTag }} · {{ round.modelName }} · revision {{ round.revision }}</a>
            <span class="muted"> asked by {{ round.requestedByDisplayName }} on {{ round.requestedAt.slice(0, 16).replace('T', ' ') }} UTC</span>
            @if (round.message) {
              <p>{{ round.message }}</p>
            }
          </li>
        } @empty {
          <li class="muted">Nothing to review.</li>
        }
      </ul>
      <mat-slide-toggle [checked]="notices()" (change)="setNotices($event.checked)">E-mail me notices (review requested, comments on my models, approved or returned)</mat-slide-toggle>
    </section>
  `,
  styles: `
    .page { padding: 16px 24px; }
    .rounds { list-style: none; padding: 0; }
    .rounds li { padding: 8px 0; border-bottom: 1px solid var(--mat-sys-outline-variant); }
    .muted { color: var(--mat-sys-on-surface-variant); }
  `,
})
export class ReviewQueue {
  private readonly desk = inject(ReviewDesk);
  private readonly errorHandler = inject(ErrorHandler);

  protected readonly rounds = signal<readonly ReviewRound[]>([]);
  protected readonly notices = signal(true);

  constructor() {
    void this.load();
  }

  private async load(): Promise<void> {
    try {
      const [rounds, settings] = await Promise.all([this.desk.queue(), this.desk.notices()]);
      this.rounds.set(rounds);
      this.notices.set(settings.notices);
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  protected async setNotices(notices: boolean): Promise<void> {
    try {
      this.notices.set((await this.desk.setNotices(notices)).notices);
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }
}
