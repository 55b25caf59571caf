import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormControl, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatDialogActions, MatDialogClose, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';

/** Asks why a revision is issued (the reason goes into the revision's record); closes with the reason. */
@Component({
  selector: 'pl-issue-revision-dialog',
  imports: [ReactiveFormsModule, MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton, MatFormField, MatLabel, MatError, MatInput],
  template: `
    <h2 mat-dialog-title>Issue a revision</h2>
    <mat-dialog-content>
      <p>The draft as saved now becomes the next revision, fixed from then on.</p>
      <mat-form-field class="wide">
        <mat-label>Reason for the revision</mat-label>
        <textarea matInput [formControl]="reason" rows="3"></textarea>
        <mat-error>A reason is required (at most 2000 characters).</mat-error>
      </mat-form-field>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button matButton type="button" mat-dialog-close>Cancel</button>
      <button matButton="filled" type="button" (click)="issue()">Issue revision</button>
    </mat-dialog-actions>
  `,
  styles: `
    .wide {
      width: 100%;
      min-width: 360px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class IssueRevisionDialog {
  private readonly dialogRef = inject<MatDialogRef<IssueRevisionDialog, string>>(MatDialogRef);
  protected readonly reason = new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(2000), Validators.pattern(/\S/)] });

  protected issue(): void {
    this.reason.markAsDirty();
    if (this.reason.invalid) return;
    this.dialogRef.close(this.reason.value.trim());
  }
}
