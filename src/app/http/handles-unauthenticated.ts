import { HttpContext, HttpContextToken } from '@angular/common/http';

/**
 * Set on requests whose caller handles a 401 itself (restoring the session, signing in), so the error
 * interceptor does not send the user to the sign-in page for them.
 */
export const HANDLES_UNAUTHENTICATED = new HttpContextToken<boolean>(() => false);

export function unauthenticatedHandled(): HttpContext {
  return new HttpContext().set(HANDLES_UNAUTHENTICATED, true);
}
