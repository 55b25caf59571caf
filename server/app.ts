import express, { type Express } from 'express';
import helmet from 'helmet';
import type pg from 'pg';
import type { AppContext } from './app-context.js';
import { authRouter, type SignInLimit } from './auth/auth-router.js';
import { createPassport } from './auth/passport-setup.js';
import { createSessionStore, sessionMiddleware, type SessionStore } from './auth/session.js';
import { serveClient } from './client/client-files.js';
import type { Database, Logger } from './db/client.js';
import { errorMiddleware, unknownApiRoute } from './http/error-middleware.js';
import { healthRouter } from './http/health-router.js';
import { consoleLogger } from './logger.js';
import { membersRouter } from './members/members-router.js';
import { projectsRouter } from './projects/projects-router.js';
import { reportsRouter } from './reports/reports-router.js';
import { sifsRouter } from './sifs/sifs-router.js';
import { devicesRouter } from './devices/devices-router.js';
import { modelsRouter } from './models/models-router.js';
import { solvesRouter, type SolvingDeps } from './solves/solves-router.js';
import { usersRouter } from './users/users-router.js';
import { annotationsRouter } from './annotations/annotations-router.js';
import { auditRouter } from './audit/audit-router.js';
import { mailRouter } from './mail/mail-router.js';
import { createNotifier, type MailDeps } from './mail/notifier.js';
import { reviewsRouter } from './reviews/reviews-router.js';
import { refuseCrossSiteChanges } from './security/cross-site-requests.js';
import { createPermissionGuard } from './security/permission-guard.js';

export interface AppDeps {
  readonly db: Database;
  readonly pool: pg.Pool;
  /** Signs the session cookie; keep it stable across restarts so sessions survive them. */
  readonly sessionSecret: string;
  readonly logger?: Logger;
  /** Defaults to a PostgreSQL store on `pool` without periodic pruning (main.ts passes a pruning one). */
  readonly sessionStore?: SessionStore;
  /** The built client (dist/proofline/browser); null or absent serves the API and a "not built" page. */
  readonly clientDir?: string | null;
  /** Cookie only over HTTPS; default false (the server listens on http://127.0.0.1). */
  readonly secureCookie?: boolean;
  /** Default: 10 failed sign-ins per address and username per 15 minutes. */
  readonly signInLimit?: SignInLimit;
  /** Queue and notices of the solve service (server/solves/solving.ts); absent: no solve routes. */
  readonly solving?: SolvingDeps;
  /** How review notices are mailed (server/mail/notifier.ts); absent: notices are not sent. */
  readonly mail?: MailDeps | null;
}

const CONTENT_SECURITY_POLICY = {
  useDefaults: true,
  directives: {
    'default-src': ["'self'"],
    'script-src': ["'self'"],
    // Angular component styles are inline <style> elements.
    'style-src': ["'self'", "'unsafe-inline'"],
    'worker-src': ["'self'", 'blob:'],
    'img-src': ["'self'", 'data:'],
    'font-src': ["'self'", 'data:'],
    'connect-src': ["'self'"],
    'upgrade-insecure-requests': null,
  },
};

/** The Express app: API under /api, then the client. No listening here (server/main.ts does that). */
export function createApp(deps: AppDeps): Express {
  const logger = deps.logger ?? consoleLogger;
  const context: AppContext = { db: deps.db, pool: deps.pool, logger };
  const passport = createPassport(deps.db);
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', false);
  app.use(helmet({ contentSecurityPolicy: CONTENT_SECURITY_POLICY, strictTransportSecurity: deps.secureCookie === true }));

  const api = express.Router();
  api.use(refuseCrossSiteChanges);
  api.use((_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  api.use(healthRouter(context));
  api.use(
    sessionMiddleware({
      store: deps.sessionStore ?? createSessionStore(deps.pool, logger),
      secret: deps.sessionSecret,
      secureCookie: deps.secureCookie ?? false,
    }),
  );
  api.use(passport.initialize());
  api.use(passport.session());
  // Who may call each route is checked before any body is read (server/security/permission-guard.ts).
  const guard = createPermissionGuard(deps.db);
  api.use(guard.router);
  api.use(express.json({ limit: '1mb' }));

  // One line per resource.
  api.use(authRouter(context, { passport, signInLimit: deps.signInLimit ?? { failures: 10, windowMinutes: 15 } }));
  api.use(usersRouter(context));
  api.use(projectsRouter(context));
  api.use(membersRouter(context));
  api.use(sifsRouter(context));
  api.use(modelsRouter(context));
  api.use(devicesRouter(context));
  if (deps.solving) api.use(solvesRouter(context, deps.solving));
  api.use(reportsRouter(context));
  const notifier = createNotifier(deps.db, logger, deps.mail ?? null);
  api.use(reviewsRouter(context, notifier));
  api.use(annotationsRouter(context, notifier));
  api.use(auditRouter(context));
  api.use(mailRouter(notifier));

  guard.cover(api, '/api');
  api.use(unknownApiRoute);
  app.use('/api', api);

  serveClient(app, deps.clientDir ?? null);
  app.use(errorMiddleware(logger));
  return app;
}
