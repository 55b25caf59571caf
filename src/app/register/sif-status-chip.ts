import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatChip, MatChipSet } from '@angular/material/chips';
import type { SifStatus } from '../../../shared/api/sifs.js';
import { STATUS_LABELS } from './sif-labels';

/** A SIF's status as a coloured chip, plus "Archived" when it is. */
@Component({
  selector: 'pl-sif-status-chip',
  imports: [MatChipSet, MatChip],
  template: `
    <mat-chip-set [attr.aria-label]="'Status: ' + labels[status()]">
      <mat-chip disableRipple [class]="'status-' + status()">{{ labels[status()] }}</mat-chip>
      @if (archived()) {
        <mat-chip disableRipple class="status-archived">Archived</mat-chip>
      }
    </mat-chip-set>
  `,
  styleUrl: './sif-status-chip.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SifStatusChip {
  readonly status = input.required<SifStatus>();
  readonly archived = input(false);

  protected readonly labels = STATUS_LABELS;
}
