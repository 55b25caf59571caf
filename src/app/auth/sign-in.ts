import { ChangeDetectionStrategy, Component, ErrorHandler, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatCard, MatCardContent, MatCardHeader, MatCardTitle } from '@angular/material/card';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatProgressBar } from '@angular/material/progress-bar';
import { Router } from '@angular/router';
import { signInBody } from '../../../shared/api/auth.js';
import { isApiError } from '../errors/api-error';
import { fieldMessage, schemaValidator } from '../forms/schema-validator';
import { SafetyCaution } from '../shell/safety-caution';
import { SessionStore } from './session-store';

@Component({
  selector: 'pl-sign-in',
  imports: [
    ReactiveFormsModule,
    MatCard,
    MatCardHeader,
    MatCardTitle,
    MatCardContent,
    MatFormField,
    MatLabel,
    MatError,
    MatInput,
    MatButton,
    MatProgressBar,
    SafetyCaution,
  ],
  templateUrl: './sign-in.html',
  styleUrl: './sign-in.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignIn {
  private readonly session = inject(SessionStore);
  private readonly router = inject(Router);
  private readonly errorHandler = inject(ErrorHandler);
  private readonly formBuilder = inject(NonNullableFormBuilder);

  /** Where to go after signing in (set by the guard or the error interceptor). */
  readonly returnUrl = input<string>();

  protected readonly form = this.formBuilder.group({
    username: ['', schemaValidator(signInBody.shape.username)],
    password: ['', schemaValidator(signInBody.shape.password)],
  });
  protected readonly busy = signal(false);
  /** The server's refusal (wrong credentials, too many attempts), shown above the button. */
  protected readonly refusal = signal('');
  protected readonly fieldMessage = fieldMessage;

  protected async submit(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.form.markAllAsDirty();
      return;
    }
    this.busy.set(true);
    this.refusal.set('');
    try {
      await this.session.signIn(this.form.getRawValue());
      await this.router.navigateByUrl(this.safeReturnUrl());
    } catch (error) {
      if (isApiError(error, 401) || isApiError(error, 429) || isApiError(error, 400)) {
        this.refusal.set(error.message);
      } else {
        this.errorHandler.handleError(error);
      }
    } finally {
      this.busy.set(false);
    }
  }

  /** Only paths inside the app, never another site. */
  private safeReturnUrl(): string {
    const url = this.returnUrl();
    return url && url.startsWith('/') && !url.startsWith('//') && !url.startsWith('/sign-in') ? url : '/projects';
  }
}
