import { ChangeDetectionStrategy, Component, ErrorHandler, OnInit, inject, signal } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatCard, MatCardContent, MatCardHeader, MatCardSubtitle, MatCardTitle } from '@angular/material/card';
import { MatChip, MatChipSet } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSlideToggle } from '@angular/material/slide-toggle';
import { Router, RouterLink } from '@angular/router';
import type { Project } from '../../../shared/api/projects.js';
import { CreateProjectDialog } from './create-project-dialog';
import { ProjectCatalog } from './project-catalog';
import { roleLabel } from './role-labels';

@Component({
  selector: 'pl-project-list',
  imports: [
    RouterLink,
    MatButton,
    MatCard,
    MatCardHeader,
    MatCardTitle,
    MatCardSubtitle,
    MatCardContent,
    MatChipSet,
    MatChip,
    MatIcon,
    MatProgressBar,
    MatSlideToggle,
  ],
  templateUrl: './project-list.html',
  styleUrl: './project-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ProjectList implements OnInit {
  private readonly catalog = inject(ProjectCatalog);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);
  private readonly errorHandler = inject(ErrorHandler);

  protected readonly projects = this.catalog.projects;
  protected readonly loading = this.catalog.loading;
  protected readonly includeArchived = signal(false);
  protected readonly roleLabel = roleLabel;

  ngOnInit(): void {
    void this.reload();
  }

  protected setIncludeArchived(include: boolean): void {
    this.includeArchived.set(include);
    void this.reload();
  }

  protected openCreate(): void {
    this.dialog
      .open<CreateProjectDialog, void, Project>(CreateProjectDialog, { width: '520px' })
      .afterClosed()
      .subscribe((created) => {
        if (created) void this.router.navigate(['/projects', created.id]);
      });
  }

  protected location(project: Project): string {
    return [project.site, project.unit, project.client].filter(Boolean).join(' · ');
  }

  private async reload(): Promise<void> {
    try {
      await this.catalog.load(this.includeArchived());
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }
}
