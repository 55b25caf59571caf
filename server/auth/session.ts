import connectPgSimple from 'connect-pg-simple';
import session from 'express-session';
import type { RequestHandler } from 'express';
import type pg from 'pg';
import type { Logger } from '../db/client.js';

export const SESSION_COOKIE = 'proofline.sid';
const SESSION_HOURS = 12;

const PgStore = connectPgSimple(session);
export type SessionStore = InstanceType<typeof PgStore>;

/**
 * Sessions live in the `sessions` table (created by the migrations), so they survive a server restart.
 * `pruneEverySeconds` removes expired rows periodically; leave it off in tests (the timer keeps a process alive).
 */
export function createSessionStore(pool: pg.Pool, logger: Logger, pruneEverySeconds: number | false = false): SessionStore {
  return new PgStore({
    pool,
    tableName: 'sessions',
    createTableIfMissing: false,
    pruneSessionInterval: pruneEverySeconds,
    errorLog: (...args: unknown[]) => logger.warn(`session store: ${args.map(String).join(' ')}`),
  });
}

export interface SessionOptions {
  readonly store: SessionStore;
  readonly secret: string;
  /** Send the cookie over HTTPS only; off for the local http://127.0.0.1 server. */
  readonly secureCookie: boolean;
}

export function sessionMiddleware(options: SessionOptions): RequestHandler {
  return session({
    name: SESSION_COOKIE,
    store: options.store,
    secret: options.secret,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    cookie: {
      httpOnly: true,
      sameSite: 'strict',
      secure: options.secureCookie,
      maxAge: SESSION_HOURS * 3600 * 1000,
      path: '/',
    },
  });
}
