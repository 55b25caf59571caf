import { ChangeDetectionStrategy, Component, ErrorHandler, OnInit, inject } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatSlideToggle } from '@angular/material/slide-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
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
import type { UpdateUserBody, User } from '../../../shared/api/users.js';
import { SessionStore } from '../auth/session-store';
import { CreateUserDialog } from './create-user-dialog';
import { ResetPasswordDialog } from './reset-password-dialog';
import { UserAccounts } from './user-accounts';

/** Site admins: create accounts, reset passwords, grant the admin flag, disable accounts. */
@Component({
  selector: 'pl-user-admin-page',
  imports: [
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
    MatSlideToggle,
    MatButton,
    MatIcon,
  ],
  template: `
    <section class="page">
      <header class="page-header">
        <h1>User accounts</h1>
        <button matButton="filled" type="button" (click)="openCreate()">
          <mat-icon>person_add</mat-icon>
          Create user
        </button>
      </header>
      <div class="table-frame">
        <table mat-table [dataSource]="users()" class="table">
          <ng-container matColumnDef="username">
            <th mat-header-cell *matHeaderCellDef>Username</th>
            <td mat-cell *matCellDef="let account">{{ account.username }}</td>
          </ng-container>
          <ng-container matColumnDef="displayName">
            <th mat-header-cell *matHeaderCellDef>Name</th>
            <td mat-cell *matCellDef="let account">{{ account.displayName }}</td>
          </ng-container>
          <ng-container matColumnDef="isAdmin">
            <th mat-header-cell *matHeaderCellDef>Site admin</th>
            <td mat-cell *matCellDef="let account">
              <mat-slide-toggle
                [checked]="account.isAdmin"
                [disabled]="account.id === me()?.id"
                (change)="change(account, { isAdmin: $event.checked }, $event.source)"
                [attr.aria-label]="'Site admin: ' + account.username"
              />
            </td>
          </ng-container>
          <ng-container matColumnDef="active">
            <th mat-header-cell *matHeaderCellDef>Can sign in</th>
            <td mat-cell *matCellDef="let account">
              <mat-slide-toggle
                [checked]="!account.disabled"
                [disabled]="account.id === me()?.id"
                (change)="change(account, { disabled: !$event.checked }, $event.source)"
                [attr.aria-label]="'Can sign in: ' + account.username"
              />
            </td>
          </ng-container>
          <ng-container matColumnDef="actions">
            <th mat-header-cell *matHeaderCellDef><span class="cdk-visually-hidden">Actions</span></th>
            <td mat-cell *matCellDef="let account">
              <button matButton type="button" (click)="resetPassword(account)">Reset password</button>
            </td>
          </ng-container>
          <tr mat-header-row *matHeaderRowDef="columns"></tr>
          <tr mat-row *matRowDef="let account; columns: columns"></tr>
        </table>
      </div>
    </section>
  `,
  styles: `
    .table-frame {
      overflow-x: auto;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 8px;
    }
    .table {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UserAdminPage implements OnInit {
  private readonly accounts = inject(UserAccounts);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly errorHandler = inject(ErrorHandler);

  protected readonly users = this.accounts.users;
  protected readonly me = inject(SessionStore).user;
  protected readonly columns = ['username', 'displayName', 'isAdmin', 'active', 'actions'];

  ngOnInit(): void {
    void this.reload();
  }

  protected openCreate(): void {
    this.dialog
      .open<CreateUserDialog, void, User>(CreateUserDialog, { width: '460px' })
      .afterClosed()
      .subscribe((created) => {
        if (created) this.snackBar.open(`Account ${created.username} created`, undefined, { duration: 4000 });
      });
  }

  protected resetPassword(account: User): void {
    this.dialog
      .open<ResetPasswordDialog, User, User>(ResetPasswordDialog, { data: account, width: '460px' })
      .afterClosed()
      .subscribe((updated) => {
        if (updated) this.snackBar.open(`New password set for ${updated.username}`, undefined, { duration: 4000 });
      });
  }

  protected async change(account: User, change: UpdateUserBody, toggle: MatSlideToggle): Promise<void> {
    try {
      await this.accounts.update(account.id, change);
    } catch (error) {
      this.errorHandler.handleError(error);
      // The toggle moved before the server answered: put it back to the stored state.
      toggle.checked = !toggle.checked;
    }
  }

  private async reload(): Promise<void> {
    try {
      await this.accounts.load();
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }
}
