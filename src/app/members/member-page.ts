import { ChangeDetectionStrategy, Component, ErrorHandler, computed, effect, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatAutocomplete, MatAutocompleteTrigger } from '@angular/material/autocomplete';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatOption, MatSelect } from '@angular/material/select';
import {
  MatCell,
  MatCellDef,
  MatColumnDef,
  MatHeaderCell,
  MatHeaderCellDef,
  MatHeaderRow,
  MatHeaderRowDef,
  MatRow,
  MatRowDef,
  MatTable,
} from '@angular/material/table';
import { MatTooltip } from '@angular/material/tooltip';
import { Title } from '@angular/platform-browser';
import { RouterLink } from '@angular/router';
import { toSignal } from '@angular/core/rxjs-interop';
import { canDo } from '../../../shared/api/permissions.js';
import { PROJECT_ROLES, type Member, type Project, type ProjectRole } from '../../../shared/api/projects.js';
import { UserAccounts } from '../admin/user-accounts';
import { SessionStore } from '../auth/session-store';
import { fieldMessage } from '../forms/schema-validator';
import { ProjectCatalog } from '../projects/project-catalog';
import { roleLabel } from '../projects/role-labels';
import { confirmWith } from '../shell/confirm-dialog';
import { MemberRoster } from './member-roster';

/** A project's members; its leads (and site admins) add people, change roles and remove them. */
@Component({
  selector: 'pl-member-page',
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
    MatFormField,
    MatLabel,
    MatError,
    MatInput,
    MatSelect,
    MatOption,
    MatAutocomplete,
    MatAutocompleteTrigger,
    MatButton,
    MatIconButton,
    MatIcon,
    MatTooltip,
    MatProgressBar,
  ],
  providers: [MemberRoster],
  templateUrl: './member-page.html',
  styleUrl: './member-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MemberPage {
  private readonly roster = inject(MemberRoster);
  private readonly accounts = inject(UserAccounts);
  private readonly catalog = inject(ProjectCatalog);
  private readonly session = inject(SessionStore);
  private readonly dialog = inject(MatDialog);
  private readonly title = inject(Title);
  private readonly errorHandler = inject(ErrorHandler);
  private readonly formBuilder = inject(NonNullableFormBuilder);

  /** From the route. */
  readonly projectId = input.required<string>();

  protected readonly project = signal<Project | null>(null);
  protected readonly members = this.roster.members;
  protected readonly roles = PROJECT_ROLES;
  protected readonly roleLabel = roleLabel;
  protected readonly fieldMessage = fieldMessage;
  protected readonly canManage = computed(() => {
    const project = this.project();
    return project !== null && canDo(project.myRole, this.session.isAdmin(), 'members.manage');
  });
  protected readonly columns = computed(() =>
    this.canManage() ? ['displayName', 'username', 'role', 'actions'] : ['displayName', 'username', 'role'],
  );

  protected readonly addForm = this.formBuilder.group({
    username: ['', [Validators.required, (control: { value: string }) => this.unknownUsername(control.value)]],
    role: ['engineer' as ProjectRole],
  });
  private readonly typedUsername = toSignal(this.addForm.controls.username.valueChanges, { initialValue: '' });
  /** Accounts not yet in the project that match what is typed. */
  protected readonly candidates = computed(() => {
    const typed = this.typedUsername().trim().toLowerCase();
    const memberIds = new Set(this.members().map((candidate) => candidate.userId));
    return this.accounts
      .users()
      .filter((user) => !memberIds.has(user.id) && !user.disabled)
      .filter((user) => typed === '' || user.username.includes(typed) || user.displayName.toLowerCase().includes(typed))
      .slice(0, 20);
  });

  constructor() {
    effect(() => {
      void this.load(this.projectId());
    });
  }

  protected async add(): Promise<void> {
    this.addForm.controls.username.updateValueAndValidity();
    if (this.addForm.invalid) {
      this.addForm.markAllAsDirty();
      return;
    }
    const { username, role } = this.addForm.getRawValue();
    const account = this.accounts.users().find((user) => user.username === username.trim().toLowerCase());
    if (!account) return;
    try {
      await this.roster.setRole(this.projectId(), account.id, role);
      this.addForm.reset({ username: '', role });
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  protected async changeRole(member: Member, role: ProjectRole): Promise<void> {
    try {
      await this.roster.setRole(this.projectId(), member.userId, role);
    } catch (error) {
      this.errorHandler.handleError(error);
      await this.reloadMembers();
    }
  }

  protected async remove(member: Member): Promise<void> {
    const confirmed = await confirmWith(this.dialog, {
      title: 'Remove member',
      message: `Remove ${member.displayName} (${member.username}) from this project?`,
      confirmLabel: 'Remove',
    });
    if (!confirmed) return;
    try {
      await this.roster.remove(this.projectId(), member.userId);
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  private unknownUsername(value: string): { unknown: string } | null {
    const typed = value.trim().toLowerCase();
    if (typed === '' || this.accounts.users().length === 0) return null;
    if (!this.accounts.users().some((user) => user.username === typed)) return { unknown: 'is not the username of an account' };
    if (this.members().some((candidate) => candidate.username === typed)) return { unknown: 'is already a member' };
    return null;
  }

  private async reloadMembers(): Promise<void> {
    try {
      await this.roster.load(this.projectId());
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  private async load(projectId: string): Promise<void> {
    try {
      const [project] = await Promise.all([this.catalog.get(projectId), this.roster.load(projectId)]);
      this.project.set(project);
      this.title.setTitle(`Members · ${project.name} · Proofline`);
      if (this.canManage()) await this.accounts.load();
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }
}
