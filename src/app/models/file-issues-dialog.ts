import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';

export interface FileIssues {
  readonly title: string;
  readonly intro: string;
  /** "path: message" lines, the path as in the file (events[2].lambdaDU). */
  readonly lines: readonly string[];
}

/** Lists what is wrong with a model file (an upload, or the draft before solving), by path. */
@Component({
  selector: 'pl-file-issues-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      <p>{{ data.intro }}</p>
      <ul class="lines">
        @for (line of data.lines; track $index) {
          <li>{{ line }}</li>
        }
      </ul>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button matButton="filled" type="button" mat-dialog-close>Close</button>
    </mat-dialog-actions>
  `,
  styles: `
    .lines {
      font-family: ui-monospace, monospace;
      font-size: 13px;
      max-height: 50vh;
      overflow: auto;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FileIssuesDialog {
  protected readonly data = inject<FileIssues>(MAT_DIALOG_DATA);
}
