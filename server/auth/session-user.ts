import type { Request } from 'express';
import type { User } from '../../shared/api/users.js';
import { apiErrors } from '../errors.js';

/** The signed-in user as passport keeps it on req.user (loaded fresh from the database per request). */
export type SessionUser = User;

declare global {
  namespace Express {
    // Passport's req.user is declared as Express.User; ours carries the account fields.
    interface User extends SessionUser {}
  }
}

/** The signed-in user of the request, or a 401. */
export function requireUser(req: Request): SessionUser {
  if (!req.user) throw apiErrors.unauthenticated();
  return req.user;
}

/** The signed-in site admin of the request, or 401 / 403. */
export function requireAdmin(req: Request): SessionUser {
  const user = requireUser(req);
  if (!user.isAdmin) throw apiErrors.forbidden('only a site admin may manage user accounts');
  return user;
}
