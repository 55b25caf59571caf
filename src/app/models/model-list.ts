import { ChangeDetectionStrategy, Component, ErrorHandler, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { canEditModels, type ModelList as ModelSummaries } from '../../../shared/api/models.js';
import type { Project } from '../../../shared/api/projects.js';
import type { Sif } from '../../../shared/api/sifs.js';
import { describeIssues, modelFile } from '../../../shared/model-file.js';
import type { EditableModel } from '../canvas/model-graph';
import { ProjectCatalog } from '../projects/project-catalog';
import { SifRecords } from '../register/sif-records';
import { FileIssuesDialog } from './file-issues-dialog';
import { ModelRecords } from './model-records';
import { starterModel } from './starter-models';

/** The models of one SIF, with new blank models, the architecture wizard and import of a model file. */
@Component({
  selector: 'pl-model-list',
  imports: [RouterLink, MatButton, MatIcon, MatProgressBar],
  template: `
    <section class="page">
      <nav class="crumbs" aria-label="Breadcrumb">
        <a routerLink="/projects">Projects</a> /
        @if (project(); as current) {
          <a [routerLink]="['/projects', current.id]">{{ current.name }}</a> /
        }
        @if (sif(); as record) {
          <a [routerLink]="['/projects', projectId(), 'sifs', sifId()]">{{ record.tag }}</a> /
        }
      </nav>
      <header class="page-header">
        <h1>Models of {{ sif()?.tag ?? 'the SIF' }}</h1>
        @if (canEdit()) {
          <input #upload type="file" accept=".json,application/json" hidden (change)="importNew(upload)" />
          <button matButton type="button" (click)="upload.click()"><mat-icon>upload_file</mat-icon>Import a file</button>
          <a matButton="outlined" [routerLink]="['/projects', projectId(), 'sifs', sifId(), 'models', 'new-from-architecture']">
            <mat-icon>auto_fix_high</mat-icon>Architecture wizard
          </a>
          <button matButton="outlined" type="button" [disabled]="busy()" (click)="create('markov')">New state model</button>
          <button matButton="filled" type="button" [disabled]="busy()" (click)="create('fault-tree')">New fault tree</button>
        }
      </header>
      @if (loading()) {
        <mat-progress-bar mode="indeterminate" />
      }
      <ul class="models" aria-label="Models">
        @for (model of models(); track model.id) {
          <li>
            <a class="model" [routerLink]="['/projects', projectId(), 'sifs', sifId(), 'models', model.id]">
              <span class="name">{{ model.name }}</span>
              <span class="kind">{{ model.kind === 'fault-tree' ? 'Fault tree' : 'State model' }}</span>
              <span class="muted">
                draft version {{ model.draftVersion }} ·
                {{ model.latestRevision ? 'revision ' + model.latestRevision : 'no revision issued' }} · updated
                {{ model.updatedAt.slice(0, 16).replace('T', ' ') }} UTC
              </span>
            </a>
          </li>
        } @empty {
          @if (!loading()) {
            <li class="muted empty">No models yet. Start a fault tree or a state model, use the architecture wizard, or import a model file.</li>
          }
        }
      </ul>
    </section>
  `,
  styles: `
    .crumbs {
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
      margin-bottom: 8px;
    }
    .models {
      list-style: none;
      padding: 0;
      display: flex;
      flex-direction: column;
      gap: 8px;
    }
    .model {
      display: flex;
      flex-wrap: wrap;
      align-items: baseline;
      gap: 4px 12px;
      padding: 12px 16px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 12px;
      color: inherit;
      text-decoration: none;
      &:hover,
      &:focus-visible {
        background: var(--mat-sys-surface-container);
      }
    }
    .name {
      font: var(--mat-sys-title-medium);
    }
    .kind {
      padding: 0 8px;
      border-radius: 8px;
      background: var(--mat-sys-secondary-container);
      color: var(--mat-sys-on-secondary-container);
      font: var(--mat-sys-label-medium);
    }
    .empty {
      padding: 16px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ModelList {
  private readonly records = inject(ModelRecords);
  private readonly catalog = inject(ProjectCatalog);
  private readonly sifs = inject(SifRecords);
  private readonly router = inject(Router);
  private readonly dialog = inject(MatDialog);
  private readonly errorHandler = inject(ErrorHandler);

  readonly projectId = input.required<string>();
  readonly sifId = input.required<string>();

  protected readonly project = signal<Project | null>(null);
  protected readonly sif = signal<Sif | null>(null);
  protected readonly models = signal<ModelSummaries>([]);
  protected readonly loading = signal(true);
  protected readonly busy = signal(false);
  protected readonly canEdit = computed(() => {
    const project = this.project();
    return project !== null && !project.archived && !this.sif()?.archived && canEditModels(project.myRole);
  });

  constructor() {
    effect(() => {
      const [projectId, sifId] = [this.projectId(), this.sifId()];
      untracked(() => void this.load(projectId, sifId));
    });
  }

  private async load(projectId: string, sifId: string): Promise<void> {
    this.loading.set(true);
    try {
      const [project, sif, models] = await Promise.all([this.catalog.get(projectId), this.sifs.get(projectId, sifId), this.records.list(projectId, sifId)]);
      this.project.set(project);
      this.sif.set(sif);
      this.models.set(models);
    } catch (error) {
      this.errorHandler.handleError(error);
    } finally {
      this.loading.set(false);
    }
  }

  protected async create(kind: EditableModel['kind']): Promise<void> {
    const sif = this.sif();
    if (!sif) return;
    const name = `${sif.tag} ${kind === 'fault-tree' ? 'fault tree' : 'state model'}`;
    await this.createFrom(starterModel(kind, name, sif.missionHours, sif.demandMode));
  }

  protected async importNew(input: HTMLInputElement): Promise<void> {
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    let json: unknown;
    try {
      json = JSON.parse(await file.text());
    } catch (error) {
      this.dialog.open(FileIssuesDialog, { data: { title: `${file.name} is not JSON`, intro: 'A model file is a JSON document.', lines: [String(error)] }, width: '640px' });
      return;
    }
    const checked = modelFile.safeParse(json);
    if (!checked.success) {
      this.dialog.open(FileIssuesDialog, {
        data: { title: `${file.name} is not a valid model file`, intro: 'Nothing was imported. The file has these problems:', lines: describeIssues(checked.error) },
        width: '640px',
      });
      return;
    }
    await this.createFrom(checked.data);
  }

  private async createFrom(file: unknown): Promise<void> {
    this.busy.set(true);
    try {
      const created = await this.records.create(this.projectId(), this.sifId(), file);
      await this.router.navigate(['/projects', this.projectId(), 'sifs', this.sifId(), 'models', created.id]);
    } catch (error) {
      this.errorHandler.handleError(error);
    } finally {
      this.busy.set(false);
    }
  }
}
