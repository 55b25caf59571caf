import { ChangeDetectionStrategy, Component, ErrorHandler, computed, inject } from '@angular/core';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIcon } from '@angular/material/icon';
import { MatMenu, MatMenuItem, MatMenuTrigger } from '@angular/material/menu';
import { MatToolbar } from '@angular/material/toolbar';
import { MatTooltip } from '@angular/material/tooltip';
import { Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { ChangePasswordDialog } from '../auth/change-password-dialog';
import { SessionStore } from '../auth/session-store';
import { SafetyCaution } from './safety-caution';
import { ThemePreference } from './theme-preference';

/** The frame of every signed-in page: toolbar, the routed page, and the caution in the footer. */
@Component({
  selector: 'pl-shell',
  imports: [
    RouterOutlet,
    RouterLink,
    RouterLinkActive,
    MatToolbar,
    MatButton,
    MatIconButton,
    MatIcon,
    MatMenu,
    MatMenuItem,
    MatMenuTrigger,
    MatTooltip,
    SafetyCaution,
  ],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shell {
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);
  private readonly dialog = inject(MatDialog);
  private readonly errorHandler = inject(ErrorHandler);
  protected readonly theme = inject(ThemePreference);

  protected readonly user = this.session.user;
  protected readonly isAdmin = this.session.isAdmin;
  protected readonly themeLabel = computed(() => {
    switch (this.theme.choice()) {
      case 'light':
        return 'Light theme (switch to dark)';
      case 'dark':
        return 'Dark theme (switch to follow the system)';
      case 'system':
        return 'Theme follows the system (switch to light)';
    }
  });
  protected readonly themeIcon = computed(() => {
    switch (this.theme.choice()) {
      case 'light':
        return 'light_mode';
      case 'dark':
        return 'dark_mode';
      case 'system':
        return 'contrast';
    }
  });

  protected changePassword(): void {
    this.dialog.open(ChangePasswordDialog, { width: '420px' });
  }

  protected async signOut(): Promise<void> {
    try {
      await this.session.signOut();
      await this.router.navigateByUrl('/sign-in');
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }
}
