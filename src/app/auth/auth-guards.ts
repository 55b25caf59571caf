import { ErrorHandler, inject } from '@angular/core';
import { Router, type CanActivateFn } from '@angular/router';
import { SessionStore } from './session-store';

/** Routes behind the sign-in: an unknown visitor goes to the sign-in page and comes back after it. */
export const signedInGuard: CanActivateFn = async (_route, state) => {
  const router = inject(Router);
  const user = await restoredUser();
  return user ? true : router.createUrlTree(['/sign-in'], { queryParams: { returnUrl: state.url } });
};

/** The user accounts pages: site administrators only (the server refuses everyone else as well). */
export const adminGuard: CanActivateFn = async () => {
  const router = inject(Router);
  const user = await restoredUser();
  return user?.isAdmin ? true : router.createUrlTree(['/projects']);
};

/** The sign-in page itself: someone already signed in goes on to the projects. */
export const signedOutGuard: CanActivateFn = async () => {
  const router = inject(Router);
  const user = await restoredUser();
  return user ? router.createUrlTree(['/projects']) : true;
};

async function restoredUser() {
  const session = inject(SessionStore);
  const errorHandler = inject(ErrorHandler);
  try {
    return await session.restore();
  } catch (error) {
    errorHandler.handleError(error);
    return null;
  }
}
