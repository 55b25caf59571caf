import { ErrorHandler, Injectable, Injector, inject } from '@angular/core';
import { MatSnackBar } from '@angular/material/snack-bar';
import { ApiError } from './api-error';

/**
 * The one ErrorHandler of the app: every error is logged, and the user is told in a snack bar, with the
 * server's own message when there is one. Errors are never swallowed here.
 */
@Injectable()
export class AppErrorHandler implements ErrorHandler {
  // The snack bar is looked up on first use: the ErrorHandler is created before the overlay exists.
  private readonly injector = inject(Injector);

  handleError(error: unknown): void {
    console.error(error);
    this.injector.get(MatSnackBar).open(messageFor(error), 'Dismiss', { panelClass: 'snack-error', duration: 10_000 });
  }
}

/** What the user reads about an error. */
export function messageFor(error: unknown): string {
  if (error instanceof ApiError) {
    if (error.status === 401) return 'Your session has ended. Please sign in again.';
    return error.message;
  }
  const message = error instanceof Error ? error.message : String(error);
  return `Something went wrong: ${message}`;
}
