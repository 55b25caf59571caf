import { ChangeDetectionStrategy, Component, ErrorHandler, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { RouterLink } from '@angular/router';
import type { AuditEntry } from '../../../shared/api/audit.js';
import { ReviewDesk } from './review-desk';

/** The audit trail of a project, or of one SIF (?sifId=), with its CSV download. */
@Component({
  selector: 'pl-audit-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatButton],
  template: `
    <section class="page">
      <nav class="crumbs"><a [routerLink]="['/projects', projectId()]">Project</a></nav>
      <header class="head">
        <h1>Audit trail{{ sifId() ? ' of the SIF' : ' of the project' }}</h1>
        <a matButton="outlined" [href]="csvUrl()" download>Download CSV</a>
      </header>
      <table class="trail">
        <thead><tr><th>When (UTC)</th><th>Who</th><th>What</th><th>Details</th></tr></thead>
        <tbody>
          @for (entry of entries(); track entry.id) {
            <tr [attr.data-action]="entry.action"><td>{{ entry.at.slice(0, 19).replace('T', ' ') }}</td><td>{{ entry.actorDisplayName }}</td><td>{{ entry.action }}</td><td>{{ entry.summary }}</td></tr>
          } @empty {
            <tr><td colspan="4" class="muted">Nothing recorded yet.</td></tr>
          }
        </tbody>
      </table>
    </section>
  `,
  styles: `
    .page { padding: 16px 24px; }
    .head { display: flex; gap: 16px; align-items: center; }
    .trail { border-collapse: collapse; width: 100%; }
    .trail th, .trail td { text-align: left; padding: 4px 8px; border-bottom: 1px solid var(--mat-sys-outline-variant); }
    .muted { color: var(--mat-sys-on-surface-variant); }
  `,
})
export class AuditPage {
  private readonly desk = inject(ReviewDesk);
  private readonly errorHandler = inject(ErrorHandler);

  readonly projectId = input.required<string>();
  /** From the query string. */
  readonly sifId = input<string | undefined>(undefined);

  protected readonly entries = signal<readonly AuditEntry[]>([]);
  protected readonly csvUrl = computed(() => `/api/projects/${this.projectId()}/audit/csv${this.sifId() ? `?sifId=${encodeURIComponent(this.sifId()!)}` : ''}`);

  constructor() {
    effect(() => {
      const [projectId, sifId] = [this.projectId(), this.sifId() ?? null];
      untracked(() => void this.load(projectId, sifId));
    });
  }

  private async load(projectId: string, sifId: string | null): Promise<void> {
    try {
      this.entries.set(await this.desk.audit(projectId, sifId));
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }
}
