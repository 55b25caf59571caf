import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ErrorHandler,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatFormField, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatPaginator, type PageEvent } from '@angular/material/paginator';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatSort, MatSortHeader, type Sort } from '@angular/material/sort';
import {
  MatCell,
  MatCellDef,
  MatColumnDef,
  MatHeaderCell,
  MatHeaderCellDef,
  MatHeaderRow,
  MatHeaderRowDef,
  MatNoDataRow,
  MatRow,
  MatRowDef,
  MatTable,
} from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import { debounceTime, distinctUntilChanged } from 'rxjs';
import { canDo } from '../../../shared/api/permissions.js';
import type { Project } from '../../../shared/api/projects.js';
import { SIF_SORT_KEYS, SIF_STATUSES, type Sif, type SifListQuery, type SifPage, type SifStatus } from '../../../shared/api/sifs.js';
import { SessionStore } from '../auth/session-store';
import { DEMAND_MODE_LABELS, STATUS_LABELS, targetSummary } from './sif-labels';
import { SifRecords } from './sif-records';
import { SifStatusChip } from './sif-status-chip';

type SortKey = (typeof SIF_SORT_KEYS)[number];

/** How long the search waits after the last keystroke before asking the server. */
export const SEARCH_DEBOUNCE_MS = 300;

/**
 * The SIF register of a project: sorting, filtering and paging run on the server through the list
 * query, so the table stays fast however long the register grows.
 */
@Component({
  selector: 'pl-sif-register-table',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatTable,
    MatColumnDef,
    MatHeaderCell,
    MatHeaderCellDef,
    MatCell,
    MatCellDef,
    MatHeaderRow,
    MatHeaderRowDef,
    MatRow,
    MatRowDef,
    MatNoDataRow,
    MatSort,
    MatSortHeader,
    MatPaginator,
    MatFormField,
    MatLabel,
    MatPrefix,
    MatInput,
    MatSelect,
    MatOption,
    MatCheckbox,
    MatIcon,
    MatButton,
    MatProgressBar,
    SifStatusChip,
  ],
  templateUrl: './sif-register-table.html',
  styleUrl: './sif-register-table.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SifRegisterTable {
  private readonly records = inject(SifRecords);
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);
  private readonly errorHandler = inject(ErrorHandler);

  readonly project = input.required<Project>();

  protected readonly columns = ['tag', 'title', 'demandMode', 'sil', 'status', 'owner', 'updatedAt'] as const;
  protected readonly statuses = SIF_STATUSES;
  protected readonly statusLabels = STATUS_LABELS;
  protected readonly targetSummary = targetSummary;
  protected readonly pageSizeOptions = [10, 25, 50, 100];

  protected readonly searchControl = new FormControl('', { nonNullable: true });
  protected readonly search = signal('');
  protected readonly status = signal<SifStatus | ''>('');
  protected readonly includeArchived = signal(false);
  protected readonly sort = signal<{ key: SortKey; order: 'asc' | 'desc' }>({ key: 'tag', order: 'asc' });
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);

  protected readonly page = signal<SifPage | null>(null);
  protected readonly loading = signal(false);
  protected readonly rows = computed<readonly Sif[]>(() => this.page()?.items ?? []);
  protected readonly total = computed(() => this.page()?.total ?? 0);
  protected readonly canCreate = computed(() => {
    const project = this.project();
    return !project.archived && canDo(project.myRole, this.session.isAdmin(), 'sif.create');
  });

  /** The list query exactly as the API takes it (page is 1-based there). */
  protected readonly query = computed<SifListQuery>(() => ({
    search: this.search() || undefined,
    status: this.status() || undefined,
    includeArchived: this.includeArchived() ? 'true' : 'false',
    sort: this.sort().key,
    order: this.sort().order,
    page: this.pageIndex() + 1,
    pageSize: this.pageSize(),
  }));

  private latestRequest = 0;

  constructor() {
    this.searchControl.valueChanges
      .pipe(debounceTime(SEARCH_DEBOUNCE_MS), distinctUntilChanged(), takeUntilDestroyed(inject(DestroyRef)))
      .subscribe((text) => {
        this.search.set(text.trim());
        this.pageIndex.set(0);
      });
    effect(() => {
      const projectId = this.project().id;
      const query = this.query();
      untracked(() => void this.load(projectId, query));
    });
  }

  protected setStatus(status: SifStatus | ''): void {
    this.status.set(status);
    this.pageIndex.set(0);
  }

  protected setIncludeArchived(include: boolean): void {
    this.includeArchived.set(include);
    this.pageIndex.set(0);
  }

  protected setSort(sort: Sort): void {
    const key = SIF_SORT_KEYS.find((candidate) => candidate === sort.active) ?? 'tag';
    this.sort.set({ key, order: sort.direction === 'desc' ? 'desc' : 'asc' });
    this.pageIndex.set(0);
  }

  protected setPage(event: PageEvent): void {
    this.pageSize.set(event.pageSize);
    this.pageIndex.set(event.pageIndex);
  }

  protected demandModeLabel(record: Sif): string {
    return DEMAND_MODE_LABELS[record.demandMode];
  }

  protected open(record: Sif): void {
    void this.router.navigate(['/projects', record.projectId, 'sifs', record.id]);
  }

  private async load(projectId: string, query: SifListQuery): Promise<void> {
    const request = ++this.latestRequest;
    this.loading.set(true);
    try {
      const page = await this.records.list(projectId, query);
      if (request === this.latestRequest) this.page.set(page);
    } catch (error) {
      if (request === this.latestRequest) this.errorHandler.handleError(error);
    } finally {
      if (request === this.latestRequest) this.loading.set(false);
    }
  }
}
