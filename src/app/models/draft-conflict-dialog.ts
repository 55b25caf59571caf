import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';
import type { ModelDraft } from '../../../shared/api/models.js';
import { toEditable, type EditableModel } from '../canvas/model-graph';

export interface DraftConflict {
  readonly mine: EditableModel;
  readonly theirs: ModelDraft;
}

/** "mine": save the user's edits over the stored draft; "theirs": load the stored draft (mine stay in undo). */
export type DraftConflictChoice = 'mine' | 'theirs';

/** Shown when an autosave met a newer draft: what differs, and the choice. Nothing is lost either way. */
@Component({
  selector: 'pl-draft-conflict-dialog',
  imports: [MatDialogTitle, MatDialogContent, MatDialogActions, MatDialogClose, MatButton],
  template: `
    <h2 mat-dialog-title>Someone else saved this model</h2>
    <mat-dialog-content>
      <p>
        {{ conflict.theirs.updatedByDisplayName }} saved version {{ conflict.theirs.version }} at
        {{ conflict.theirs.updatedAt.slice(0, 16).replace('T', ' ') }} UTC while you were editing. Your edits are not saved
        yet and are still on the canvas.
      </p>
      <table class="counts">
        <thead>
          <tr>
            <th scope="col"></th>
            <th scope="col">Yours</th>
            <th scope="col">Stored now</th>
          </tr>
        </thead>
        <tbody>
          @for (row of rows; track row.label) {
            <tr [class.differs]="row.mine !== row.theirs">
              <th scope="row">{{ row.label }}</th>
              <td>{{ row.mine }}</td>
              <td>{{ row.theirs }}</td>
            </tr>
          }
        </tbody>
      </table>
      <p class="muted">
        "Load theirs" puts the stored draft on the canvas; your version stays one Undo (Ctrl+Z) away, so you can
        copy parts of it back.
      </p>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button matButton type="button" mat-dialog-close>Decide later</button>
      <button matButton="outlined" type="button" [mat-dialog-close]="'theirs'">Load theirs</button>
      <button matButton="filled" type="button" [mat-dialog-close]="'mine'">Keep mine and save over</button>
    </mat-dialog-actions>
  `,
  styles: `
    .counts {
      border-collapse: collapse;
      margin: 8px 0;
      th,
      td {
        text-align: left;
        padding: 4px 12px 4px 0;
        border-bottom: 1px solid var(--mat-sys-outline-variant);
      }
      .differs td {
        color: var(--mat-sys-primary);
        font-weight: 600;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DraftConflictDialog {
  protected readonly conflict = inject<DraftConflict>(MAT_DIALOG_DATA);
  protected readonly rows = compare(this.conflict.mine, toEditable(this.conflict.theirs.content));
}

function compare(mine: EditableModel, theirs: EditableModel): { label: string; mine: string; theirs: string }[] {
  const counts = (model: EditableModel): Record<string, string> =>
    model.kind === 'fault-tree'
      ? { Name: model.name, Events: String(model.events.length), Gates: String(model.gates.length), 'Common-cause groups': String(model.ccf?.length ?? 0), Top: model.top || '(none)' }
      : { Name: model.name, States: String(model.states.length), Transitions: String(model.transitions.length) };
  const a = counts(mine);
  const b = counts(theirs);
  return Object.keys({ ...a, ...b }).map((label) => ({ label, mine: a[label] ?? '—', theirs: b[label] ?? '—' }));
}
