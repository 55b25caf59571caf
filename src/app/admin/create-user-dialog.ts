import { ChangeDetectionStrategy, Component, ErrorHandler, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatDialogActions, MatDialogClose, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { createUserBody, type User } from '../../../shared/api/users.js';
import { isApiError, type ApiError } from '../errors/api-error';
import { fieldMessage, schemaValidator } from '../forms/schema-validator';
import { showServerIssues } from '../forms/server-issues';
import { UserAccounts } from './user-accounts';

@Component({
  selector: 'pl-create-user-dialog',
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
    MatCheckbox,
    MatButton,
  ],
  template: `
    <h2 mat-dialog-title>Create user</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content class="fields">
        <mat-form-field>
          <mat-label>Username</mat-label>
          <input matInput formControlName="username" autocomplete="off" />
          <mat-error>{{ fieldMessage('Username', form.controls.username) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Display name</mat-label>
          <input matInput formControlName="displayName" />
          <mat-error>{{ fieldMessage('Display name', form.controls.displayName) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>First password</mat-label>
          <input matInput type="password" formControlName="password" autocomplete="new-password" />
          <mat-error>{{ fieldMessage('Password', form.controls.password) }}</mat-error>
        </mat-form-field>
        <mat-checkbox formControlName="isAdmin">Site administrator (manages user accounts)</mat-checkbox>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button matButton type="button" mat-dialog-close>Cancel</button>
        <button matButton="filled" type="submit" [disabled]="busy()">Create</button>
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
export class CreateUserDialog {
  private readonly accounts = inject(UserAccounts);
  private readonly dialogRef = inject<MatDialogRef<CreateUserDialog, User>>(MatDialogRef);
  private readonly errorHandler = inject(ErrorHandler);
  private readonly formBuilder = inject(NonNullableFormBuilder);

  protected readonly form = this.formBuilder.group({
    username: ['', schemaValidator(createUserBody.shape.username)],
    displayName: ['', schemaValidator(createUserBody.shape.displayName)],
    password: ['', schemaValidator(createUserBody.shape.password)],
    isAdmin: [false],
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
      this.dialogRef.close(await this.accounts.create(this.form.getRawValue()));
    } catch (error) {
      // 400 validation_failed and 409 already_exists (a username taken) name their fields.
      const fieldError = isApiError(error, 400) || (isApiError(error, 409) && error.code === 'already_exists');
      const placed = fieldError && showServerIssues(error as ApiError, (path) => this.form.get(path));
      if (!placed) this.errorHandler.handleError(error);
    } finally {
      this.busy.set(false);
    }
  }
}
