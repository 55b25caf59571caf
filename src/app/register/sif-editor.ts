import { ChangeDetectionStrategy, Component, ErrorHandler, computed, effect, inject, input, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { Title } from '@angular/platform-browser';
import { Router, RouterLink } from '@angular/router';
import { firstValueFrom, map } from 'rxjs';
import { FROZEN_SIF_STATUSES, canChangeStatus, canDo } from '../../../shared/api/permissions.js';
import type { Project } from '../../../shared/api/projects.js';
import { SIF_DEMAND_MODES, type SifTargetKind } from '../../../shared/api/sif-target.js';
import { SIF_STATUSES, sifConflictDetails, type Sif } from '../../../shared/api/sifs.js';
import { SessionStore } from '../auth/session-store';
import { isApiError, type ApiError } from '../errors/api-error';
import { fieldMessage } from '../forms/schema-validator';
import { showServerIssues } from '../forms/server-issues';
import { ProjectCatalog } from '../projects/project-catalog';
import { confirmWith } from '../shell/confirm-dialog';
import { SifConflictDialog, type SifConflict, type SifConflictChoice } from './sif-conflict-dialog';
import {
  CONTENT_FIELDS,
  EMPTY_SIF_FORM,
  buildSifForm,
  checkFormTarget,
  controlForIssue,
  createBodyOf,
  formValueOf,
  readNumber,
  updateBodyOf,
} from './sif-form';
import { DEMAND_MODE_LABELS, STATUS_LABELS, TARGET_KIND_LABELS, formatMeasure, formatRiskReduction } from './sif-labels';
import { SifRecords } from './sif-records';
import { SifStatusChip } from './sif-status-chip';

const HOURS_PER_YEAR = 8760;

/** Creates a SIF (no sifId) or edits one; a stale save opens the conflict choice and keeps the edits. */
@Component({
  selector: 'pl-sif-editor',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatFormField,
    MatLabel,
    MatError,
    MatHint,
    MatSuffix,
    MatInput,
    MatSelect,
    MatOption,
    MatButton,
    MatIcon,
    MatProgressBar,
    SifStatusChip,
  ],
  templateUrl: './sif-editor.html',
  styleUrl: './sif-editor.scss',
  host: { '(window:beforeunload)': 'warnBeforeUnload($event)' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SifEditor {
  private readonly records = inject(SifRecords);
  private readonly catalog = inject(ProjectCatalog);
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly title = inject(Title);
  private readonly errorHandler = inject(ErrorHandler);

  /** From the route. */
  readonly projectId = input.required<string>();
  /** From the route; absent when creating. */
  readonly sifId = input<string>();

  protected readonly form = buildSifForm(inject(NonNullableFormBuilder));
  protected readonly project = signal<Project | null>(null);
  /** The stored record the form's changes are built on (its version goes with the next save). */
  protected readonly base = signal<Sif | null>(null);
  protected readonly busy = signal(false);
  protected readonly loaded = signal(false);
  /** Why the SIF could not be shown (unknown, or in a project the user is not a member of). */
  protected readonly missing = signal<string | null>(null);

  protected readonly demandModes = SIF_DEMAND_MODES;
  protected readonly demandModeLabels = DEMAND_MODE_LABELS;
  protected readonly targetKindLabels = TARGET_KIND_LABELS;
  protected readonly statusLabels = STATUS_LABELS;
  protected readonly silLevels = ['1', '2', '3', '4'];
  protected readonly fieldMessage = fieldMessage;
  protected readonly formatMeasure = formatMeasure;
  protected readonly formatRiskReduction = formatRiskReduction;

  protected readonly value = toSignal(this.form.valueChanges.pipe(map(() => this.form.getRawValue())), {
    initialValue: this.form.getRawValue(),
  });

  protected readonly creating = computed(() => this.sifId() === undefined);
  protected readonly role = computed(() => this.project()?.myRole ?? null);
  protected readonly locked = computed(() => Boolean(this.project()?.archived || this.base()?.archived));
  protected readonly canEdit = computed(() => {
    if (this.locked()) return false;
    return canDo(this.role(), this.session.isAdmin(), this.creating() ? 'sif.create' : 'sif.edit');
  });
  protected readonly canArchive = computed(
    () => !this.creating() && !this.project()?.archived && canDo(this.role(), this.session.isAdmin(), 'sif.archive'),
  );
  /** Statuses the user may move this record to (its own status included). */
  protected readonly statusOptions = computed(() => {
    const base = this.base();
    if (!base || this.locked()) return [];
    return SIF_STATUSES.filter((to) => canChangeStatus(this.role(), this.session.isAdmin(), base.status, to));
  });
  protected readonly canSave = computed(() => this.canEdit() || this.statusOptions().length > 1);
  /**
   * Target kinds that apply to the chosen demand mode, plus the kind already chosen so that it stays
   * visible (with its error) after the demand mode changed under it.
   */
  protected readonly targetKinds = computed<readonly SifTargetKind[]>(() => {
    const { demandMode, targetKind } = this.value();
    const applicable: readonly SifTargetKind[] = demandMode === 'low' ? ['sil', 'rrf', 'pfdAvg'] : ['sil', 'pfh'];
    return applicable.includes(targetKind) ? applicable : [...applicable, targetKind];
  });
  /** The target in its other forms, derived with the shared function; null while the target is invalid. */
  protected readonly derived = computed(() => {
    const check = checkFormTarget(this.value());
    return check.ok ? check.derived : null;
  });
  protected readonly missionYears = computed(() => {
    const hours = readNumber(this.value().missionHours);
    return hours !== null && hours > 0 ? hours / HOURS_PER_YEAR : null;
  });
  protected readonly frozen = computed(() => {
    const base = this.base();
    return base !== null && FROZEN_SIF_STATUSES.includes(base.status);
  });

  private saved = false;

  constructor() {
    effect(() => {
      void this.load(this.projectId(), this.sifId());
    });
    effect(() => {
      this.applyAccess(this.canEdit(), this.statusOptions().length > 1);
    });
  }

  /** Asked by the route's leave guard. */
  hasUnsavedChanges(): boolean {
    return !this.saved && this.form.dirty;
  }

  protected warnBeforeUnload(event: BeforeUnloadEvent): void {
    if (this.hasUnsavedChanges()) event.preventDefault();
  }

  protected async save(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsDirty();
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    try {
      const base = this.base();
      if (base) {
        await this.saveChanges(base);
      } else {
        const created = await this.records.create(this.projectId(), createBodyOf(this.form.getRawValue()));
        this.saved = true;
        this.snackBar.open(`${created.tag} created`, undefined, { duration: 4000 });
        await this.router.navigate(['/projects', this.projectId()]);
      }
    } catch (error) {
      await this.handleSaveError(error);
    } finally {
      this.busy.set(false);
    }
  }

  protected async toggleArchived(): Promise<void> {
    const base = this.base();
    if (!base) return;
    const archiving = !base.archived;
    if (archiving) {
      const confirmed = await confirmWith(this.dialog, {
        title: 'Archive SIF',
        message: `Archive ${base.tag}? It leaves the register (shown again with "Show archived") and cannot be changed until restored.`,
        confirmLabel: 'Archive',
      });
      if (!confirmed) return;
    }
    try {
      const updated = await this.records.setArchived(this.projectId(), base.id, archiving);
      this.adopt(updated, !this.form.dirty);
      this.snackBar.open(`${updated.tag} ${archiving ? 'archived' : 'restored'}`, undefined, { duration: 4000 });
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  private async saveChanges(base: Sif): Promise<void> {
    const value = this.form.getRawValue();
    if (this.frozen() && FROZEN_SIF_STATUSES.includes(value.status) && CONTENT_FIELDS.some((field) => this.form.controls[field].dirty)) {
      this.form.controls.status.setErrors({ server: `must be set back to Draft to change a record that is ${STATUS_LABELS[value.status].toLowerCase()}` });
      this.form.controls.status.markAsTouched();
      return;
    }
    const body = updateBodyOf(value, base);
    if (!body) {
      this.form.markAsPristine();
      this.snackBar.open('Nothing to save: the form matches the stored record', undefined, { duration: 4000 });
      return;
    }
    const updated = await this.records.update(this.projectId(), base.id, body);
    this.adopt(updated, true);
    this.snackBar.open(`${updated.tag} saved (version ${updated.version})`, undefined, { duration: 4000 });
  }

  private async handleSaveError(error: unknown): Promise<void> {
    if (isApiError(error, 409) && error.code === 'version_conflict') {
      const details = sifConflictDetails.safeParse(error.details);
      if (details.success) {
        await this.resolveConflict(details.data.current);
        return;
      }
    }
    // 400 validation_failed and 409 already_exists (a tag taken in the project) name their fields.
    const fieldError = isApiError(error, 400) || (isApiError(error, 409) && error.code === 'already_exists');
    const placed = fieldError && showServerIssues(error as ApiError, (path) => controlForIssue(this.form, path));
    if (!placed) this.errorHandler.handleError(error);
  }

  /** The user's edits stay in the form unless they choose the stored record. */
  private async resolveConflict(theirs: Sif): Promise<void> {
    const conflict: SifConflict = { mine: this.form.getRawValue(), theirs };
    const choice = await firstValueFrom(
      this.dialog
        .open<SifConflictDialog, SifConflict, SifConflictChoice>(SifConflictDialog, { data: conflict, width: '640px' })
        .afterClosed(),
    );
    if (choice === 'theirs') {
      this.adopt(theirs, true);
    } else if (choice === 'mine') {
      this.base.set(theirs);
      await this.saveChanges(theirs);
    }
  }

  /** Makes a stored record the base; its values replace the form's only when asked. */
  private adopt(record: Sif, replaceForm: boolean): void {
    this.base.set(record);
    if (replaceForm) {
      this.form.reset(formValueOf(record));
      this.form.markAsPristine();
    }
    this.title.setTitle(`${record.tag} · Proofline`);
  }

  private applyAccess(editable: boolean, statusChangeable: boolean): void {
    for (const field of CONTENT_FIELDS) {
      const control = this.form.controls[field];
      if (editable) control.enable({ emitEvent: false });
      else control.disable({ emitEvent: false });
    }
    if (statusChangeable && !this.locked()) this.form.controls.status.enable({ emitEvent: false });
    else this.form.controls.status.disable({ emitEvent: false });
  }

  private async load(projectId: string, sifId: string | undefined): Promise<void> {
    this.loaded.set(false);
    this.missing.set(null);
    try {
      const [project, record] = await Promise.all([
        this.catalog.get(projectId),
        sifId === undefined ? Promise.resolve(null) : this.records.get(projectId, sifId),
      ]);
      this.project.set(project);
      if (record) {
        this.adopt(record, true);
      } else {
        this.base.set(null);
        this.form.reset(EMPTY_SIF_FORM);
        this.title.setTitle(`New SIF · ${project.name} · Proofline`);
      }
      this.loaded.set(true);
    } catch (error) {
      if (isApiError(error, 404)) {
        this.missing.set('There is no such SIF, or it is in a project you are not a member of.');
      } else {
        this.errorHandler.handleError(error);
      }
    }
  }
}
