import { ChangeDetectionStrategy, Component, DestroyRef, ErrorHandler, computed, effect, inject, input, signal, untracked, viewChild } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Title } from '@angular/platform-browser';
import { RouterLink } from '@angular/router';
import { canEditModels } from '../../../shared/api/models.js';
import type { Project } from '../../../shared/api/projects.js';
import type { Sif } from '../../../shared/api/sifs.js';
import { describeIssues, modelFile } from '../../../shared/model-file.js';
import { ModelCanvas } from '../canvas/model-canvas';
import { isApiError } from '../errors/api-error';
import { ProjectCatalog } from '../projects/project-catalog';
import { SifRecords } from '../register/sif-records';
import { DraftConflictDialog, type DraftConflict, type DraftConflictChoice } from './draft-conflict-dialog';
import { DraftStore, modelIssues } from './draft-store';
import { FileIssuesDialog, type FileIssues } from './file-issues-dialog';
import { IssueRevisionDialog } from './issue-revision-dialog';
import { ModelRecords } from './model-records';
import { SolveRunner } from './solve-runner';
import { ReviewPanel } from '../review/review-panel';

const SAVE_STATE_TEXT = {
  saved: 'All changes saved',
  pending: 'Unsaved changes',
  saving: 'Saving…',
  conflict: 'Not saved: someone else saved a newer version',
  failed: 'Not saved yet: retrying',
} as const;

/**
 * The model editor: the canvas of one model's draft with autosave, import and export of the model file,
 * issuing a revision and solving with progress and cancel. The finished solve links to its results.
 */
@Component({
  selector: 'pl-model-editor',
  imports: [ModelCanvas, ReviewPanel, RouterLink, MatButton, MatIcon, MatProgressBar],
  providers: [DraftStore, SolveRunner],
  templateUrl: './model-editor.html',
  styleUrl: './model-editor.scss',
  host: { '(window:beforeunload)': 'warnBeforeUnload($event)' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ModelEditor {
  protected readonly store = inject(DraftStore);
  protected readonly runner = inject(SolveRunner);
  private readonly records = inject(ModelRecords);
  private readonly catalog = inject(ProjectCatalog);
  private readonly sifs = inject(SifRecords);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly title = inject(Title);
  private readonly errorHandler = inject(ErrorHandler);

  readonly projectId = input.required<string>();
  readonly sifId = input.required<string>();
  readonly modelId = input.required<string>();

  private readonly canvas = viewChild(ModelCanvas);

  protected readonly project = signal<Project | null>(null);
  protected readonly sif = signal<Sif | null>(null);
  protected readonly latestRevision = signal<number | null>(null);
  protected readonly loadError = signal<string | null>(null);
  /** An action that reads the saved draft is running (solve start, revision, import, export). */
  protected readonly busy = signal(false);
  /** A file is being imported: the canvas is read-only meanwhile. */
  protected readonly importing = signal(false);
  protected readonly canEdit = computed(() => {
    const project = this.project();
    return project !== null && !project.archived && canEditModels(project.myRole);
  });
  protected readonly saveText = computed(() => SAVE_STATE_TEXT[this.store.state()]);
  protected readonly progressPercent = computed(() => Math.round(this.runner.progress() * 100));
  protected readonly resultsLink = computed(() => {
    const id = this.runner.finishedId();
    return id === null ? null : ['/projects', this.projectId(), 'sifs', this.sifId(), 'models', this.modelId(), 'results', id];
  });
  private conflictShown: unknown = null;

  constructor() {
    effect(() => {
      const [projectId, sifId, modelId] = [this.projectId(), this.sifId(), this.modelId()];
      untracked(() => void this.load(projectId, sifId, modelId));
    });
    effect(() => {
      const conflict = this.store.conflict();
      if (conflict && conflict !== this.conflictShown) {
        this.conflictShown = conflict;
        untracked(() => this.resolveConflict());
      }
    });
    effect(() => {
      const name = this.store.model()?.name;
      if (name) this.title.setTitle(`${name} · Proofline`);
    });
    inject(DestroyRef).onDestroy(() => {
      this.store.dispose();
      this.runner.stop();
    });
  }

  private async load(projectId: string, sifId: string, modelId: string): Promise<void> {
    try {
      const [project, sif, detail] = await Promise.all([this.catalog.get(projectId), this.sifs.get(projectId, sifId), this.records.get(projectId, modelId)]);
      this.project.set(project);
      this.sif.set(sif);
      this.latestRevision.set(detail.latestRevision);
      this.store.load(projectId, detail);
      if (this.store.restored()) this.snackBar.open('Edits not yet saved from your last visit were put back and are being saved.', 'OK', { duration: 8000 });
    } catch (error) {
      this.loadError.set(isApiError(error, 404) ? 'This model does not exist or you may not see it.' : 'The model could not be loaded.');
      this.errorHandler.handleError(error);
    }
  }

  protected resolveConflict(): void {
    const theirs = this.store.conflict();
    const mine = this.store.model();
    if (!theirs || !mine) return;
    this.dialog
      .open<DraftConflictDialog, DraftConflict, DraftConflictChoice>(DraftConflictDialog, { data: { mine, theirs }, width: '560px' })
      .afterClosed()
      .subscribe((choice) => {
        if (choice === 'mine') void this.store.keepMine();
        if (choice === 'theirs') this.store.takeTheirs();
      });
  }

  /**
   * Saves the draft, checks the saved content is a complete model file (listing its problems by path
   * otherwise), then runs `action` on that saved version while autosave is held, so no save races with it.
   */
  private async withSavedDraft(action: string, run: (version: number) => Promise<void>): Promise<void> {
    if (this.busy()) return;
    this.busy.set(true);
    // An automatic layout still running (a model opened without positions) goes into the draft first.
    await this.canvas()?.settled();
    const outcome = await this.store.whileHeld(async (saved) => {
      const issues = modelIssues(saved.content);
      if (issues.length > 0) {
        this.showIssues({
          title: `The model cannot be used to ${action} yet`,
          intro: 'Fix these problems first; each is also marked on the canvas.',
          lines: issues.map((issue) => `${issue.path}: ${issue.message}`),
        });
        return;
      }
      await run(saved.version);
    }).finally(() => this.busy.set(false));
    if (outcome.ran) return;
    const why =
      outcome.reason === 'conflict'
        ? 'someone else saved a newer version: choose what to keep first'
        : `the draft could not be saved (${this.store.error() ?? 'no answer from the server'}); your edits are kept and saving is retried`;
    this.snackBar.open(`Not done: ${why}, then ${action} again.`, 'Dismiss', { duration: 10_000 });
  }

  protected async solve(): Promise<void> {
    if (this.runner.running()) return;
    await this.withSavedDraft('solve', async (version) => {
      try {
        await this.runner.start(this.projectId(), this.modelId(), { kind: 'draft', version });
      } catch (error) {
        this.errorHandler.handleError(error);
      }
    });
  }

  protected async issueRevision(): Promise<void> {
    await this.withSavedDraft('issue a revision', async (version) => {
      const reason = await new Promise<string | undefined>((resolve) =>
        this.dialog.open<IssueRevisionDialog, void, string>(IssueRevisionDialog).afterClosed().subscribe(resolve),
      );
      if (!reason) return;
      try {
        const revision = await this.records.issueRevision(this.projectId(), this.modelId(), version, reason);
        this.latestRevision.set(revision.number);
        this.snackBar.open(`Revision ${revision.number} issued.`, 'OK', { duration: 5000 });
      } catch (error) {
        this.errorHandler.handleError(error);
      }
    });
  }

  protected async exportFile(): Promise<void> {
    await this.withSavedDraft('export it', async () => {
      try {
        const blob = await this.records.exportFile(this.projectId(), this.modelId());
        const url = URL.createObjectURL(blob);
        const link = document.createElement('a');
        link.href = url;
        link.download = `${(this.store.model()?.name ?? 'model').replace(/[^A-Za-z0-9_.-]+/g, '-')}.proofline.json`;
        link.click();
        setTimeout(() => URL.revokeObjectURL(url));
      } catch (error) {
        this.errorHandler.handleError(error);
      }
    });
  }

  protected async importFile(input: HTMLInputElement): Promise<void> {
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    let parsedJson: unknown;
    try {
      parsedJson = JSON.parse(await file.text());
    } catch (error) {
      this.showIssues({ title: `${file.name} is not JSON`, intro: 'A model file is a JSON document.', lines: [error instanceof Error ? error.message : String(error)] });
      return;
    }
    const checked = modelFile.safeParse(parsedJson);
    if (!checked.success) {
      this.showIssues({ title: `${file.name} is not a valid model file`, intro: 'Nothing was imported. The file has these problems:', lines: describeIssues(checked.error) });
      return;
    }
    if (checked.data.kind !== this.store.model()?.kind) {
      this.showIssues({ title: 'Another kind of model', intro: 'Nothing was imported.', lines: [`kind: the file is a ${checked.data.kind} model; this model is a ${this.store.model()?.kind}. Import it as a new model from the model list.`] });
      return;
    }
    if (this.busy()) return;
    // The canvas is read-only while the file goes in, so no edit lands between the save and the import.
    this.busy.set(true);
    this.importing.set(true);
    try {
      await this.canvas()?.settled();
      const outcome = await this.store.whileHeld(async (saved) => {
        try {
          this.store.replaceWithStored(await this.records.importFile(this.projectId(), this.modelId(), saved.version, checked.data));
          this.snackBar.open(`Imported ${file.name}. Undo (Ctrl+Z) brings back what was there before.`, 'OK', { duration: 8000 });
        } catch (error) {
          this.errorHandler.handleError(error);
        }
      });
      if (!outcome.ran) this.snackBar.open(`Nothing was imported: save the draft first (${this.saveText().toLowerCase()}), then import again.`, 'Dismiss', { duration: 10_000 });
    } finally {
      this.busy.set(false);
      this.importing.set(false);
    }
  }

  protected warnBeforeUnload(event: BeforeUnloadEvent): void {
    if (this.store.unsaved()) event.preventDefault();
  }

  private showIssues(data: FileIssues): void {
    this.dialog.open(FileIssuesDialog, { data, width: '640px' });
  }
}
