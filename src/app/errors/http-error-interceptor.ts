import { HttpErrorResponse, type HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { Router } from '@angular/router';
import { catchError, throwError } from 'rxjs';
import { SessionStore } from '../auth/session-store';
import { HANDLES_UNAUTHENTICATED } from '../http/handles-unauthenticated';
import { toApiError } from './api-error';

/**
 * Turns every failed request into an ApiError carrying the server's message. A 401 means the session
 * ended (a wrong password typed into a form is a 401 too, but with its own code, and stays on the
 * form): the user goes to the sign-in page and comes back to where they were after signing in. Every
 * other failure is left to its caller, which shows a conflict, a field error or hands it to the
 * ErrorHandler.
 */
export const httpErrorInterceptor: HttpInterceptorFn = (request, next) => {
  const router = inject(Router);
  const session = inject(SessionStore);
  return next(request).pipe(
    catchError((error: unknown) => {
      if (!(error instanceof HttpErrorResponse)) return throwError(() => error);
      const apiError = toApiError(error);
      const sessionEnded = apiError.status === 401 && apiError.code !== 'invalid_credentials';
      if (sessionEnded && !request.context.get(HANDLES_UNAUTHENTICATED)) {
        session.forget();
        const returnUrl = router.url.startsWith('/sign-in') ? undefined : router.url;
        void router.navigate(['/sign-in'], { queryParams: { returnUrl } });
      }
      return throwError(() => apiError);
    }),
  );
};
