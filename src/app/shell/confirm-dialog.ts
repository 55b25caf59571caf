import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import {
  MAT_DIALOG_DATA,
  MatDialog,
  MatDialogActions,
  MatDialogClose,
  MatDialogContent,
  MatDialogTitle,
} from '@angular/material/dialog';
import { firstValueFrom } from 'rxjs';

export interface ConfirmRequest {
  readonly title: string;
  readonly message: string;
  readonly confirmLabel: string;
}

/** Asks before a step the user may not mean (archive, remove a member). */
@Component({
  selector: 'pl-confirm-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>{{ request.title }}</h2>
    <mat-dialog-content>
      <p>{{ request.message }}</p>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button matButton type="button" [mat-dialog-close]="false">Cancel</button>
      <button matButton="filled" type="button" [mat-dialog-close]="true">{{ request.confirmLabel }}</button>
    </mat-dialog-actions>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ConfirmDialog {
  protected readonly request = inject<ConfirmRequest>(MAT_DIALOG_DATA);
}

/** Opens the confirmation and resolves true only when the user confirmed. */
export async function confirmWith(dialog: MatDialog, request: ConfirmRequest): Promise<boolean> {
  const answer = await firstValueFrom(
    dialog.open<ConfirmDialog, ConfirmRequest, boolean>(ConfirmDialog, { data: request, width: '420px' }).afterClosed(),
  );
  return answer === true;
}
