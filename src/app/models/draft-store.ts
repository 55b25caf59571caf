import { ErrorHandler, Injectable, computed, inject, signal } from '@angular/core';
import { draftConflictDetails, type ModelDetail, type ModelDraft } from '../../../shared/api/models.js';
import { sameJsonContent } from '../../../shared/canonical-json.js';
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

/** The draft as the server holds it, handed to an action run while autosave is held. */
export interface SavedDraft {
  readonly version: number;
  readonly content: EditableModel;
}

/** What `whileHeld` answers: the action's value, or why the action did not run. */
export type HeldOutcome<T> = { readonly ran: true; readonly value: T } | { readonly ran: false; readonly reason: 'conflict' | 'failed' };

interface LocalCopy {
  readonly baseVersion: number;
  readonly content: EditableModel;
}

/** Which model a save was sent for: an answer arriving after another model was loaded must not touch this one. */
interface SaveTarget {
  readonly projectId: string;
  readonly modelId: string;
  readonly generation: number;
}

/**
 * The draft being edited: its undo history, the version the next save is based on, and autosave.
 * Edits are saved a moment after the user stops (debounced) with the draft version they were made on;
 * until the server has them they are also kept in this browser's storage, so a closed tab or a lost
 * connection loses nothing. A 409 stops autosave and keeps the edits until the user chooses. Actions
 * that read the stored draft (solve, issue a revision, import, export) run through `whileHeld`, which
 * saves first and keeps autosave from racing with them.
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
  /** Raised at every load, so answers to saves of a model shown before are recognised. */
  private generation = 0;
  /** The content the server holds at `savedVersion` (or is being sent). */
  private savedContent: EditableModel | null = null;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private saving: Promise<void> | null = null;
  /** How many actions hold autosave (`whileHeld`); while above 0 nothing is sent by the timer. */
  private holds = 0;
  /** Whether the current run of failed saves was already reported (a retry every few seconds says nothing new). */
  private failureReported = false;
  private readonly retryWhenOnline = (): void => {
    if (this.saveState() === 'failed') this.schedule(0);
  };

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

  constructor() {
    globalThis.addEventListener?.('online', this.retryWhenOnline);
  }

  load(projectId: string, detail: ModelDetail): void {
    if (this.modelId !== detail.id) this.saveBeforeLeaving();
    this.projectId = projectId;
    this.modelId = detail.id;
    this.generation++;
    this.failureReported = false;
    const stored = toEditable(detail.draft.content);
    this.savedContent = stored;
    this.savedVersion.set(detail.draft.version);
    this.conflictDraft.set(null);
    this.lastError.set(null);
    const local = this.readLocal();
    // Compared whatever the key order: the server's jsonb does not keep the order the browser wrote.
    if (local && !sameJsonContent(local.content, stored)) {
      // Edits this browser had not saved: put them back on top of what they were based on and save them.
      this.history.set(recordEdit(startHistory(stored), local.content));
      this.savedVersion.set(local.baseVersion);
      this.restoredLocal.set(true);
      this.saveState.set('pending');
      this.schedule(0);
      return;
    }
    this.restoredLocal.set(false);
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

  /**
   * Saves the edits made so far, then runs `action` on the version the server now holds while autosave
   * waits, so that no save races with it (a solve, an issued revision, an import or an export works on
   * exactly that version, and an import's new version is not overwritten by a save based on the old
   * one). Edits made meanwhile are kept (history and local copy) and saved once the action is over.
   * The action does not run when the edits could not be saved (a conflict, or the server unreachable).
   */
  async whileHeld<T>(action: (saved: SavedDraft) => Promise<T>): Promise<HeldOutcome<T>> {
    this.holds++;
    this.cancelTimer();
    try {
      const ready = await this.saveCurrent();
      if (ready !== 'saved' || !this.savedContent) return { ran: false, reason: ready === 'saved' ? 'failed' : ready };
      return { ran: true, value: await action({ version: this.savedVersion(), content: this.savedContent }) };
    } finally {
      this.holds--;
      if (this.holds === 0) this.resume();
    }
  }

  /** Conflict resolved in favour of the user's edits: they are saved over the stored draft. */
  async keepMine(): Promise<void> {
    const theirs = this.conflictDraft();
    if (!theirs) return;
    this.savedVersion.set(theirs.version);
    this.savedContent = toEditable(theirs.content);
    this.conflictDraft.set(null);
    this.saveState.set('pending');
    // The local copy now says which version the edits go over, should the page close before the save.
    this.writeLocal();
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
    this.conflictDraft.set(null);
    this.saveState.set('saved');
    this.clearLocal();
  }

  /** The page is closing: edits not yet sent are sent now (the local copy keeps them until the server has them). */
  dispose(): void {
    this.saveBeforeLeaving();
    this.generation++;
    globalThis.removeEventListener?.('online', this.retryWhenOnline);
  }

  private changed(): void {
    this.writeLocal();
    if (this.saveState() === 'conflict') return;
    // A failed save keeps its state (the retry is due); any other edit waits for the user to pause.
    if (this.saveState() !== 'saving') this.saveState.set(this.saveState() === 'failed' ? 'failed' : 'pending');
    if (this.saveState() !== 'failed') this.schedule(AUTOSAVE_DELAY_MS);
  }

  /** Starts the save of unsent edits at once, for the model shown now, without waiting for it. */
  private saveBeforeLeaving(): void {
    this.cancelTimer();
    if (this.history() && !this.saving && this.saveState() !== 'conflict' && this.model() !== this.savedContent) void this.save();
  }

  private schedule(delay: number): void {
    this.cancelTimer();
    // While an action holds autosave the timer is not set; `resume` schedules the save afterwards.
    if (this.holds > 0) return;
    this.timer = setTimeout(() => {
      this.timer = null;
      void this.save();
    }, delay);
  }

  private cancelTimer(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
  }

  /** After the last hold: edits made meanwhile (or a save that failed) get their save scheduled. */
  private resume(): void {
    if (!this.history() || this.saveState() === 'conflict' || this.saving) return;
    if (this.model() === this.savedContent) return;
    if (this.saveState() === 'failed') {
      this.schedule(RETRY_DELAY_MS);
      return;
    }
    this.saveState.set('pending');
    this.schedule(AUTOSAVE_DELAY_MS);
  }

  /** Waits for a save in flight, then saves what is on the canvas now; says whether the server holds it. */
  private async saveCurrent(): Promise<'saved' | 'conflict' | 'failed'> {
    while (this.saving) await this.saving;
    const target = this.model();
    if (this.saveState() !== 'conflict' && target !== this.savedContent) await this.save();
    if (this.saveState() === 'conflict') return 'conflict';
    return target === this.savedContent ? 'saved' : 'failed';
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
    const target: SaveTarget = { projectId: this.projectId, modelId: this.modelId, generation: this.generation };
    this.saving = this.send(target, this.savedVersion(), content);
    try {
      await this.saving;
    } finally {
      this.saving = null;
    }
  }

  private async send(target: SaveTarget, version: number, content: EditableModel): Promise<void> {
    let draft: ModelDraft;
    try {
      draft = await this.records.saveDraft(target.projectId, target.modelId, version, content as unknown as Record<string, unknown>);
    } catch (error) {
      if (target.generation !== this.generation) {
        console.warn('Edits of a model no longer shown could not be saved; they are kept in this browser and put back when it is opened', error);
        return;
      }
      this.failed(error, content);
      return;
    }
    if (target.generation !== this.generation) {
      this.forgetLocalIfHeld(target.modelId, content);
      return;
    }
    this.stored(draft.version, content);
  }

  /** The server holds `content` at `version`: the next save goes on from there. */
  private stored(version: number, content: EditableModel): void {
    this.savedVersion.set(version);
    this.savedContent = content;
    this.lastError.set(null);
    this.failureReported = false;
    if (this.model() === content) {
      this.saveState.set('saved');
      this.clearLocal();
      return;
    }
    // Edits made while saving: the local copy now names the version they go over (else, after a
    // reload, they would be sent on the old version and meet our own save as a conflict).
    this.writeLocal();
    this.saveState.set('pending');
    this.schedule(AUTOSAVE_DELAY_MS);
  }

  private failed(error: unknown, content: EditableModel): void {
    if (isApiError(error, 409) && error.code === 'version_conflict') {
      const details = draftConflictDetails.safeParse(error.details);
      if (details.success) {
        const current = details.data.current;
        // The server already holds exactly what was sent: an earlier try of this save got through but
        // its answer was lost (a dropped connection). That is no conflict; go on from its version.
        if (sameJsonContent(toEditable(current.content), content)) {
          this.stored(current.version, content);
          return;
        }
        this.conflictDraft.set(current);
        this.saveState.set('conflict');
        return;
      }
    }
    this.saveState.set('failed');
    this.lastError.set(error instanceof Error ? error.message : String(error));
    // Reported once per run of failures; the save state keeps saying "retrying" meanwhile.
    if (!this.failureReported) this.errorHandler.handleError(error);
    else console.warn('The draft could not be saved again; retrying', error);
    this.failureReported = true;
    this.schedule(RETRY_DELAY_MS);
  }

  private storageKey(modelId = this.modelId): string {
    return `proofline.draft.${modelId}`;
  }

  private readLocal(modelId = this.modelId): LocalCopy | null {
    try {
      const text = localStorage.getItem(this.storageKey(modelId));
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

  private clearLocal(modelId = this.modelId): void {
    try {
      localStorage.removeItem(this.storageKey(modelId));
    } catch (error) {
      console.warn('The local copy of the draft could not be removed', error);
    }
  }

  /** A model no longer shown got its save through: its local copy goes, unless it holds later edits. */
  private forgetLocalIfHeld(modelId: string, content: EditableModel): void {
    const local = this.readLocal(modelId);
    if (local && sameJsonContent(local.content, content)) this.clearLocal(modelId);
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
