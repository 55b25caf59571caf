import { ChangeDetectionStrategy, Component, ErrorHandler, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatDialogActions, MatDialogClose, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { createProjectBody, type Project } from '../../../shared/api/projects.js';
import { isApiError } from '../errors/api-error';
import { fieldMessage, schemaValidator } from '../forms/schema-validator';
import { showServerIssues } from '../forms/server-issues';
import { ProjectCatalog } from './project-catalog';

@Component({
  selector: 'pl-create-project-dialog',
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
    <h2 mat-dialog-title>Create project</h2>
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
      <mat-dialog-content class="fields">
        <mat-form-field>
          <mat-label>Name</mat-label>
          <input matInput formControlName="name" cdkFocusInitial />
          <mat-error>{{ fieldMessage('Name', form.controls.name) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Site</mat-label>
          <input matInput formControlName="site" />
          <mat-error>{{ fieldMessage('Site', form.controls.site) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Unit</mat-label>
          <input matInput formControlName="unit" />
          <mat-error>{{ fieldMessage('Unit', form.controls.unit) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Client</mat-label>
          <input matInput formControlName="client" />
          <mat-error>{{ fieldMessage('Client', form.controls.client) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Description</mat-label>
          <textarea matInput formControlName="description" rows="3"></textarea>
          <mat-error>{{ fieldMessage('Description', form.controls.description) }}</mat-error>
        </mat-form-field>
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
export class CreateProjectDialog {
  private readonly catalog = inject(ProjectCatalog);
  private readonly dialogRef = inject<MatDialogRef<CreateProjectDialog, Project>>(MatDialogRef);
  private readonly errorHandler = inject(ErrorHandler);
  private readonly formBuilder = inject(NonNullableFormBuilder);

  protected readonly form = this.formBuilder.group({
    name: ['', schemaValidator(createProjectBody.shape.name)],
    site: ['', schemaValidator(createProjectBody.shape.site)],
    unit: ['', schemaValidator(createProjectBody.shape.unit)],
    client: ['', schemaValidator(createProjectBody.shape.client)],
    description: ['', schemaValidator(createProjectBody.shape.description)],
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
      this.dialogRef.close(await this.catalog.create(this.form.getRawValue()));
    } catch (error) {
      const placed = isApiError(error, 400) && showServerIssues(error, (path) => this.form.get(path));
      if (!placed) this.errorHandler.handleError(error);
    } finally {
      this.busy.set(false);
    }
  }
}
