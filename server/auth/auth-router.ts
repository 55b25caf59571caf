import { Router, type Request, type RequestHandler, type Response } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import type { Passport } from 'passport';
import { changePasswordBody, signInBody } from '../../shared/api/auth.js';
import type { AppContext } from '../app-context.js';
import { apiErrors } from '../errors.js';
import { parseInput } from '../http/validate.js';
import { AuthService } from './auth-service.js';
import { SESSION_COOKIE } from './session.js';
import { requireUser, type SessionUser } from './session-user.js';

export interface SignInLimit {
  /** Failed sign-ins allowed per client address and username within the window. */
  readonly failures: number;
  readonly windowMinutes: number;
}

export interface AuthRouterOptions {
  readonly passport: InstanceType<typeof Passport>;
  readonly signInLimit: SignInLimit;
}

function authenticate(passport: AuthRouterOptions['passport'], req: Request, res: Response): Promise<SessionUser | false> {
  return new Promise((resolve, reject) => {
    const handler = passport.authenticate('local', { session: false }, (error: unknown, user: SessionUser | false) =>
      error ? reject(error) : resolve(user),
    ) as RequestHandler;
    handler(req, res, reject);
  });
}

function logIn(req: Request, user: SessionUser): Promise<void> {
  return new Promise((resolve, reject) => req.logIn(user, (error?: unknown) => (error ? reject(error) : resolve())));
}

function endSession(req: Request): Promise<void> {
  return new Promise((resolve, reject) =>
    req.logout((logoutError?: unknown) => {
      if (logoutError) return reject(logoutError);
      req.session.destroy((destroyError?: unknown) => (destroyError ? reject(destroyError) : resolve()));
    }),
  );
}

export function authRouter({ db }: AppContext, options: AuthRouterOptions): Router {
  const router = Router();

  // Counts failed sign-ins only, per address and username, so one user's typos do not lock out others.
  const signInLimiter = rateLimit({
    windowMs: options.signInLimit.windowMinutes * 60_000,
    limit: options.signInLimit.failures,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => {
      const username = typeof req.body?.username === 'string' ? req.body.username.trim().toLowerCase() : '';
      return `${ipKeyGenerator(req.ip ?? '')}|${username}`;
    },
    handler: (_req, _res, next) =>
      next(apiErrors.rateLimited(`too many failed sign-ins; wait ${options.signInLimit.windowMinutes} minutes and try again`)),
  });

  router.post('/auth/sign-in', signInLimiter, async (req, res) => {
    req.body = parseInput(signInBody, req.body, 'body');
    const user = await authenticate(options.passport, req, res);
    if (!user) throw apiErrors.invalidCredentials();
    // req.logIn regenerates the session (passport 0.7), so a session id set before sign-in is never reused.
    await logIn(req, user);
    res.json(user);
  });

  router.post('/auth/sign-out', async (req, res) => {
    if (req.session) await endSession(req);
    res.clearCookie(SESSION_COOKIE, { path: '/', httpOnly: true, sameSite: 'strict' });
    res.status(204).end();
  });

  router.get('/auth/me', (req, res) => {
    res.json(requireUser(req));
  });

  router.post('/auth/password', async (req, res) => {
    const user = requireUser(req);
    const body = parseInput(changePasswordBody, req.body, 'body');
    await new AuthService(db, user).changePassword(body, req.sessionID);
    res.status(204).end();
  });

  return router;
}
