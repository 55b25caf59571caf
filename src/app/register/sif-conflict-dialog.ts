import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';
import type { Sif } from '../../../shared/api/sifs.js';
import { DEMAND_MODE_LABELS, STATUS_LABELS, TARGET_KIND_LABELS } from './sif-labels';
import { FIELD_LABELS, differingFields, formValueOf, type SifFormValue } from './sif-form';

export interface SifConflict {
  /** What the user has in the form, unsaved. */
  readonly mine: SifFormValue;
  /** The record as stored now, saved by someone else since the user opened it. */
  readonly theirs: Sif;
}

/** "theirs": load the stored record into the form; "mine": save the form over it. Closing decides nothing. */
export type SifConflictChoice = 'theirs' | 'mine';

interface Difference {
  readonly field: keyof SifFormValue;
  readonly label: string;
  readonly mine: string;
  readonly theirs: string;
}

/**
 * Shown when a save met a newer version: which fields differ, and the choice between the stored record
 * and the user's edits. The edits stay in the form whatever is chosen until the user picks "theirs".
 */
@Component({
  selector: 'pl-sif-conflict-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>Someone else saved this SIF</h2>
    <mat-dialog-content>
      <p>
        {{ conflict.theirs.tag }} was changed since you opened it (now version {{ conflict.theirs.version }}, saved
        {{ conflict.theirs.updatedAt.slice(0, 16).replace('T', ' ') }} UTC). Your changes are not saved yet and are
        still in the form.
      </p>
      @if (differences.length > 0) {
        <table class="differences">
          <thead>
            <tr>
              <th scope="col">Field</th>
              <th scope="col">Yours</th>
              <th scope="col">Stored now</th>
            </tr>
          </thead>
          <tbody>
            @for (difference of differences; track difference.field) {
              <tr>
                <th scope="row">{{ difference.label }}</th>
                <td class="mine">{{ difference.mine }}</td>
                <td class="theirs">{{ difference.theirs }}</td>
              </tr>
            }
          </tbody>
        </table>
      } @else {
        <p>The stored record already holds the same values as your form.</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button matButton type="button" mat-dialog-close>Decide later</button>
      <button matButton="outlined" type="button" [mat-dialog-close]="'theirs'">Reload theirs</button>
      <button matButton="filled" type="button" [mat-dialog-close]="'mine'">Keep mine and overwrite</button>
    </mat-dialog-actions>
  `,
  styles: `
    .differences {
      width: 100%;
      border-collapse: collapse;
      th,
      td {
        text-align: left;
        vertical-align: top;
        padding: 6px 8px;
        border-bottom: 1px solid var(--mat-sys-outline-variant);
        white-space: pre-line;
      }
      .mine {
        color: var(--mat-sys-primary);
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SifConflictDialog {
  protected readonly conflict = inject<SifConflict>(MAT_DIALOG_DATA);
  protected readonly differences: readonly Difference[] = describeDifferences(this.conflict);
}

function describeDifferences({ mine, theirs }: SifConflict): Difference[] {
  const stored = formValueOf(theirs);
  return differingFields(mine, stored).map((field) => ({
    field,
    label: FIELD_LABELS[field],
    mine: shown(field, mine[field]),
    theirs: shown(field, stored[field]),
  }));
}

function shown(field: keyof SifFormValue, value: string): string {
  switch (field) {
    case 'demandMode':
      return DEMAND_MODE_LABELS[value as SifFormValue['demandMode']];
    case 'targetKind':
      return TARGET_KIND_LABELS[value as SifFormValue['targetKind']];
    case 'status':
      return STATUS_LABELS[value as SifFormValue['status']];
    default:
      return value.trim() === '' ? '(empty)' : value;
  }
}
