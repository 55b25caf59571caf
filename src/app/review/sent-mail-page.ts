import { ChangeDetectionStrategy, Component, ErrorHandler, inject, signal } from '@angular/core';
import type { SentMail } from '../../../shared/api/audit.js';
import { ReviewDesk } from './review-desk';

/** Site admin: the notices the server sent, newest first, with any refusal of the SMTP host. */
@Component({
  selector: 'pl-sent-mail-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  template: `
    <section class="page">
      <h1>Sent mail</h1>
      <table class="mail">
        <thead><tr><th>Sent (UTC)</th><th>To</th><th>Kind</th><th>Subject</th><th>Delivery</th></tr></thead>
        <tbody>
          @for (mail of messages(); track mail.id) {
            <tr data-sent-mail><td>{{ mail.sentAt.slice(0, 19).replace('T', ' ') }}</td><td>{{ mail.toAddress }}</td><td>{{ mail.kind }}</td><td>{{ mail.subject }}</td><td>{{ mail.error ?? 'accepted' }}</td></tr>
          } @empty {
            <tr><td colspan="5" class="muted">No mail sent yet.</td></tr>
          }
        </tbody>
      </table>
    </section>
  `,
  styles: `
    .page { padding: 16px 24px; }
    .mail { border-collapse: collapse; width: 100%; }
    .mail th, .mail td { text-align: left; padding: 4px 8px; border-bottom: 1px solid var(--mat-sys-outline-variant); }
    .muted { color: var(--mat-sys-on-surface-variant); }
  `,
})
export class SentMailPage {
  private readonly desk = inject(ReviewDesk);
  private readonly errorHandler = inject(ErrorHandler);

  protected readonly messages = signal<readonly SentMail[]>([]);

  constructor() {
    this.desk.sentMail().then(
      (messages) => this.messages.set(messages),
      (error: unknown) => this.errorHandler.handleError(error),
    );
  }
}
