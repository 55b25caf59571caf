import { ChangeDetectionStrategy, Component, ErrorHandler, computed, effect, inject, input, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatChip, MatChipSet } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Title } from '@angular/platform-browser';
import { RouterLink } from '@angular/router';
import { canDo } from '../../../shared/api/permissions.js';
import type { Project } from '../../../shared/api/projects.js';
import { SessionStore } from '../auth/session-store';
import { isApiError } from '../errors/api-error';
import { SifRegisterTable } from '../register/sif-register-table';
import { confirmWith } from '../shell/confirm-dialog';
import { ProjectCatalog } from './project-catalog';
import { roleLabel } from './role-labels';

/** One project: its facts, the way to its members, and its SIF register. */
@Component({
  selector: 'pl-project-page',
  imports: [RouterLink, MatButton, MatChipSet, MatChip, MatIcon, MatProgressBar, SifRegisterTable],
  templateUrl: './project-page.html',
  styleUrl: './project-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProjectPage {
  private readonly catalog = inject(ProjectCatalog);
  private readonly session = inject(SessionStore);
  private readonly dialog = inject(MatDialog);
  private readonly title = inject(Title);
  private readonly errorHandler = inject(ErrorHandler);

  /** From the route. */
  readonly projectId = input.required<string>();

  protected readonly project = signal<Project | null>(null);
  /** Why the project could not be shown (unknown, or not one the user is a member of). */
  protected readonly missing = signal<string | null>(null);
  protected readonly canArchive = computed(() => this.allows('project.archive'));
  protected readonly roleLabel = roleLabel;

  constructor() {
    effect(() => {
      void this.load(this.projectId());
    });
  }

  protected location(project: Project): string {
    return [project.site, project.unit, project.client].filter(Boolean).join(' · ');
  }

  protected async toggleArchived(project: Project): Promise<void> {
    const archiving = !project.archived;
    if (archiving) {
      const confirmed = await confirmWith(this.dialog, {
        title: 'Archive project',
        message: `Archive "${project.name}"? Its SIFs stay readable but cannot be changed until the project is restored.`,
        confirmLabel: 'Archive',
      });
      if (!confirmed) return;
    }
    try {
      this.project.set(await this.catalog.setArchived(project.id, archiving));
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  private allows(action: Parameters<typeof canDo>[2]): boolean {
    const project = this.project();
    return project !== null && canDo(project.myRole, this.session.isAdmin(), action);
  }

  private async load(projectId: string): Promise<void> {
    this.missing.set(null);
    try {
      const loaded = await this.catalog.get(projectId);
      this.project.set(loaded);
      this.title.setTitle(`${loaded.name} · Proofline`);
    } catch (error) {
      if (isApiError(error, 404)) {
        this.missing.set('There is no such project, or you are not one of its members.');
      } else {
        this.errorHandler.handleError(error);
      }
    }
  }
}
