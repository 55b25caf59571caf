import { ChangeDetectionStrategy, Component, ErrorHandler, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, type AbstractControl, type ValidationErrors } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatDialogActions, MatDialogClose, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatSnackBar } from '@angular/material/snack-bar';
import { changePasswordBody } from '../../../shared/api/auth.js';
import { newPassword } from '../../../shared/api/users.js';
import { isApiError } from '../errors/api-error';
import { fieldMessage, schemaValidator } from '../forms/schema-validator';
import { showServerIssues } from '../forms/server-issues';
import { SessionStore } from './session-store';

/** Change one's own password; the server ends the user's other sessions. */
@Component({
  selector: 'pl-change-password-dialog',
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
    <h2 mat-dialog-title>Change password</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content class="fields">
        <mat-form-field>
          <mat-label>Current password</mat-label>
          <input matInput type="password" formControlName="currentPassword" autocomplete="current-password" />
          <mat-error>{{ fieldMessage('Current password', form.controls.currentPassword) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>New password</mat-label>
          <input matInput type="password" formControlName="newPassword" autocomplete="new-password" />
          <mat-error>{{ fieldMessage('New password', form.controls.newPassword) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>New password again</mat-label>
          <input matInput type="password" formControlName="repeated" autocomplete="new-password" />
          <mat-error>{{ fieldMessage('New password again', form.controls.repeated) }}</mat-error>
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button matButton type="button" mat-dialog-close>Cancel</button>
        <button matButton="filled" type="submit" [disabled]="busy()">Change password</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .fields {
      display: flex;
      flex-direction: column;
      gap: 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ChangePasswordDialog {
  private readonly session = inject(SessionStore);
  private readonly dialogRef = inject(MatDialogRef<ChangePasswordDialog>);
  private readonly snackBar = inject(MatSnackBar);
  private readonly errorHandler = inject(ErrorHandler);

  protected readonly form = inject(NonNullableFormBuilder).group({
    currentPassword: ['', schemaValidator(changePasswordBody.shape.currentPassword)],
    newPassword: ['', schemaValidator(newPassword)],
    repeated: ['', (control: AbstractControl<string>) => this.matchesNewPassword(control)],
  });
  protected readonly busy = signal(false);
  protected readonly fieldMessage = fieldMessage;

  constructor() {
    this.form.controls.newPassword.valueChanges.subscribe(() => this.form.controls.repeated.updateValueAndValidity());
  }

  protected async submit(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsDirty();
      return;
    }
    const { currentPassword, newPassword: chosen } = this.form.getRawValue();
    this.busy.set(true);
    try {
      await this.session.changePassword({ currentPassword, newPassword: chosen });
      this.snackBar.open('Password changed; your other sessions were signed out', undefined, { duration: 5000 });
      this.dialogRef.close();
    } catch (error) {
      // A wrong current password comes back as a 400 naming currentPassword, shown under that field.
      const placed = isApiError(error, 400) && showServerIssues(error, (path) => this.form.get(path));
      if (!placed) this.errorHandler.handleError(error);
    } finally {
      this.busy.set(false);
    }
  }

  private matchesNewPassword(control: AbstractControl<string>): ValidationErrors | null {
    const chosen = this.form?.controls.newPassword.value ?? '';
    return control.value === chosen ? null : { mismatch: 'must repeat the new password' };
  }
}
