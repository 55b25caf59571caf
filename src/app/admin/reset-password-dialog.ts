import { ChangeDetectionStrategy, Component, ErrorHandler, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import {
  MAT_DIALOG_DATA,
  MatDialogActions,
  MatDialogClose,
  MatDialogContent,
  MatDialogRef,
  MatDialogTitle,
} from '@angular/material/dialog';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { newPassword, type User } from '../../../shared/api/users.js';
import { isApiError } from '../errors/api-error';
import { fieldMessage, schemaValidator } from '../forms/schema-validator';
import { showServerIssues } from '../forms/server-issues';
import { UserAccounts } from './user-accounts';

/** An admin sets a new password for an account; that user's sessions end. */
@Component({
  selector: 'pl-reset-password-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogTitle,
    MatDialogContent,
    MatDialogActions,
    MatDialogClose,
    MatFormField,
    MatLabel,
    MatError,
    MatInput,
    MatButton,
  ],
  template: `
    <h2 mat-dialog-title>Reset password of {{ account.displayName }}</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content>
        <p class="muted">{{ account.username }} is signed out everywhere and signs in with the new password.</p>
        <mat-form-field class="field">
          <mat-label>New password</mat-label>
          <input matInput type="password" formControlName="password" autocomplete="new-password" />
          <mat-error>{{ fieldMessage('Password', form.controls.password) }}</mat-error>
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button matButton type="button" mat-dialog-close>Cancel</button>
        <button matButton="filled" type="submit" [disabled]="busy()">Set password</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .field {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResetPasswordDialog {
  private readonly accounts = inject(UserAccounts);
  private readonly dialogRef = inject<MatDialogRef<ResetPasswordDialog, User>>(MatDialogRef);
  private readonly errorHandler = inject(ErrorHandler);
  protected readonly account = inject<User>(MAT_DIALOG_DATA);

  protected readonly form = inject(NonNullableFormBuilder).group({
    password: ['', schemaValidator(newPassword)],
  });
  protected readonly busy = signal(false);
  protected readonly fieldMessage = fieldMessage;

  protected async submit(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsDirty();
      return;
    }
    this.busy.set(true);
    try {
      this.dialogRef.close(await this.accounts.update(this.account.id, { password: this.form.controls.password.value }));
    } catch (error) {
      const placed = isApiError(error, 400) && showServerIssues(error, (path) => this.form.get(path));
      if (!placed) this.errorHandler.handleError(error);
    } finally {
      this.busy.set(false);
    }
  }
}
