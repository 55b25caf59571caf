import { ErrorHandler, Injectable, computed, inject, signal } from '@angular/core';
import { draftConflictDetails, type ModelDetail, type ModelDraft } from '../../../shared/api/models.js';
import { formatPath, modelFile } from '../../../shared/model-file.js';
import type { ValidationIssue } from '../../../shared/api/errors.js';
import { recordEdit, redo, startHistory, undo, type EditHistory } from '../canvas/edit-history';
import { toEditable, type EditableModel } from '../canvas/model-graph';
import { isApiError } from '../errors/api-error';
import { ModelRecords } from './model-records';

/** How long after the last edit the draft is saved. */
export const AUTOSAVE_DELAY_MS = 800;
/** How long to wait before saving again after a save failed for a reason other than a conflict. */
export const RETRY_DELAY_MS = 5000;

export type SaveState = 'saved' | 'pending' | 'saving' | 'conflict' | 'failed';

interface LocalCopy {
  readonly baseVersion: number;
  readonly content: EditableModel;
}

/**
 * The draft being edited: its undo history, the version the next save is based on, and autosave.
 * Edits are saved a moment after the user stops (debounced) with the draft version they were made on;
 * until the server has them they are also kept in this browser's storage, so a closed tab or a lost
 * connection loses nothing. A 409 stops autosave and keeps the edits until the user chooses.
 * Provided by the editor page (one store per open model).
 */
@Injectable()
export class DraftStore {
  private readonly records = inject(ModelRecords);
  private readonly errorHandler = inject(ErrorHandler);

  private readonly history = signal<EditHistory<EditableModel> | null>(null);
  private readonly savedVersion = signal(0);
  private readonly saveState = signal<SaveState>('saved');
  private readonly conflictDraft = signal<ModelDraft | null>(null);
  private readonly lastError = signal<string | null>(null);
  private readonly restoredLocal = signal(false);
  private projectId = '';
  private modelId = '';
  /** The content the server holds at `savedVersion` (or is being sent). */
  private savedContent: EditableModel | null = null;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private saving: Promise<void> | null = null;

  readonly model = computed(() => this.history()?.present ?? null);
  readonly version = this.savedVersion.asReadonly();
  readonly state = this.saveState.asReadonly();
  readonly conflict = this.conflictDraft.asReadonly();
  readonly error = this.lastError.asReadonly();
  /** True when edits left unsaved in this browser were found and put back on load. */
  readonly restored = this.restoredLocal.asReadonly();
  readonly canUndo = computed(() => (this.history()?.past.length ?? 0) > 0);
  readonly canRedo = computed(() => (this.history()?.future.length ?? 0) > 0);
  /** Problems of the current content as a model file, checked as the user edits (the server's check). */
  readonly issues = computed<readonly ValidationIssue[]>(() => {
    const model = this.model();
    return model ? modelIssues(model) : [];
  });
  readonly unsaved = computed(() => this.saveState() !== 'saved');

  load(projectId: string, detail: ModelDetail): void {
    this.projectId = projectId;
    this.modelId = detail.id;
    const stored = toEditable(detail.draft.content);
    this.savedContent = stored;
    this.savedVersion.set(detail.draft.version);
    this.conflictDraft.set(null);
    const local = this.readLocal();
    if (local && JSON.stringify(local.content) !== JSON.stringify(stored)) {
      // Edits this browser had not saved: put them back on top of what they were based on and save them.
      this.history.set(recordEdit(startHistory(stored), local.content));
      this.savedVersion.set(local.baseVersion);
      this.restoredLocal.set(true);
      this.schedule(0);
      return;
    }
    this.clearLocal();
    this.history.set(startHistory(stored));
    this.saveState.set('saved');
  }

  /** Records an edit and schedules its save. */
  apply(next: EditableModel): void {
    const history = this.history();
    if (!history || next === history.present) return;
    this.history.set(recordEdit(history, next));
    this.changed();
  }

  undo(): void {
    const history = this.history();
    if (!history || history.past.length === 0) return;
    this.history.set(undo(history));
    this.changed();
  }

  redo(): void {
    const history = this.history();
    if (!history || history.future.length === 0) return;
    this.history.set(redo(history));
    this.changed();
  }

  /** Saves now (before solving, issuing or exporting); resolves when the server has the current content. */
  async flush(): Promise<boolean> {
    this.cancelTimer();
    while (this.saving) await this.saving;
    if (this.saveState() === 'conflict') return false;
    if (this.model() !== this.savedContent) await this.save();
    return this.saveState() === 'saved';
  }

  /** Conflict resolved in favour of the user's edits: they are saved over the stored draft. */
  async keepMine(): Promise<void> {
    const theirs = this.conflictDraft();
    if (!theirs) return;
    this.savedVersion.set(theirs.version);
    this.savedContent = toEditable(theirs.content);
    this.conflictDraft.set(null);
    this.saveState.set('pending');
    await this.save();
  }

  /** Conflict resolved in favour of the stored draft; the user's edits stay one undo step away. */
  takeTheirs(): void {
    const theirs = this.conflictDraft();
    const history = this.history();
    if (!theirs || !history) return;
    const stored = toEditable(theirs.content);
    this.history.set(recordEdit(history, stored));
    this.savedVersion.set(theirs.version);
    this.savedContent = stored;
    this.conflictDraft.set(null);
    this.saveState.set('saved');
    this.clearLocal();
  }

  /** A new draft the server wrote (an import): it replaces the content, the old one stays in undo. */
  replaceWithStored(draft: ModelDraft): void {
    const history = this.history();
    const stored = toEditable(draft.content);
    this.history.set(history ? recordEdit(history, stored) : startHistory(stored));
    this.savedVersion.set(draft.version);
    this.savedContent = stored;
    this.saveState.set('saved');
    this.clearLocal();
  }

  /** Stops the autosave timer (the page is closing; the local copy stays for next time). */
  dispose(): void {
    this.cancelTimer();
  }

  private changed(): void {
    this.writeLocal();
    if (this.saveState() === 'conflict') return;
    this.saveState.set('pending');
    this.schedule(AUTOSAVE_DELAY_MS);
  }

  private schedule(delay: number): void {
    this.cancelTimer();
    this.timer = setTimeout(() => {
      this.timer = null;
      void this.save();
    }, delay);
  }

  private cancelTimer(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
  }

  private async save(): Promise<void> {
    if (this.saving) {
      await this.saving;
      return this.save();
    }
    const content = this.model();
    if (!content || this.saveState() === 'conflict') return;
    if (content === this.savedContent) {
      this.saveState.set('saved');
      this.clearLocal();
      return;
    }
    this.saveState.set('saving');
    this.saving = this.send(content);
    try {
      await this.saving;
    } finally {
      this.saving = null;
    }
  }

  private async send(content: EditableModel): Promise<void> {
    try {
      const draft = await this.records.saveDraft(this.projectId, this.modelId, this.savedVersion(), content as unknown as Record<string, unknown>);
      this.savedVersion.set(draft.version);
      this.savedContent = content;
      this.lastError.set(null);
      if (this.model() === content) {
        this.saveState.set('saved');
        this.clearLocal();
      } else {
        this.saveState.set('pending');
        this.schedule(AUTOSAVE_DELAY_MS);
      }
    } catch (error) {
      if (isApiError(error, 409) && error.code === 'version_conflict') {
        const details = draftConflictDetails.safeParse(error.details);
        if (details.success) {
          this.conflictDraft.set(details.data.current);
          this.saveState.set('conflict');
          return;
        }
      }
      this.saveState.set('failed');
      this.lastError.set(error instanceof Error ? error.message : String(error));
      this.errorHandler.handleError(error);
      this.schedule(RETRY_DELAY_MS);
    }
  }

  private storageKey(): string {
    return `proofline.draft.${this.modelId}`;
  }

  private readLocal(): LocalCopy | null {
    try {
      const text = localStorage.getItem(this.storageKey());
      if (!text) return null;
      const copy = JSON.parse(text) as LocalCopy;
      return typeof copy.baseVersion === 'number' && copy.content ? { baseVersion: copy.baseVersion, content: toEditable(copy.content as unknown as Record<string, unknown>) } : null;
    } catch (error) {
      console.warn('The local copy of the draft could not be read; it is ignored', error);
      return null;
    }
  }

  private writeLocal(): void {
    const content = this.model();
    if (!content) return;
    try {
      localStorage.setItem(this.storageKey(), JSON.stringify({ baseVersion: this.savedVersion(), content }));
    } catch (error) {
      // A full or disabled storage only loses the offline copy; the server save still runs.
      console.warn('The local copy of the draft could not be written', error);
    }
  }

  private clearLocal(): void {
    try {
      localStorage.removeItem(this.storageKey());
    } catch (error) {
      console.warn('The local copy of the draft could not be removed', error);
    }
  }
}

/** The model file schema's issues of a draft, with paths written as in the file ("events[2].lambdaDU"). */
export function modelIssues(model: EditableModel): ValidationIssue[] {
  const result = modelFile.safeParse(model);
  return result.success ? [] : result.error.issues.map((issue) => ({ path: formatPath(issue.path), message: plainMessage(issue) }));
}

/** The schema's generic messages for lists that are too short, said in the trade's words. */
function plainMessage(issue: { code: string; path: PropertyKey[]; message: string; minimum?: unknown }): string {
  if (issue.code !== 'too_small') return issue.message;
  const last = issue.path[issue.path.length - 1];
  if (last === 'inputs') return 'a gate needs at least one input: connect events or gates into it';
  if (last === 'members') return `a common-cause group needs at least ${String(issue.minimum ?? 2)} members: connect events into it`;
  if (last === 'events') return 'a fault tree needs at least one event';
  if (last === 'states') return 'a state model needs at least one state';
  return issue.message;
}
