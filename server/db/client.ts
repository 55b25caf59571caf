import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import * as schema from './schema/index.js';

export type Database = NodePgDatabase<typeof schema>;
/** The `tx` of `db.transaction(async (tx) => ...)`. */
export type DatabaseTransaction = Parameters<Parameters<Database['transaction']>[0]>[0];
/** Either: repositories that may run inside a transaction take this. */
export type Queryable = Database | DatabaseTransaction;

export interface Logger {
  info(message: string): void;
  warn(message: string): void;
  error(message: string, error?: unknown): void;
}

/** How the server's connections show in pg_stat_activity. */
export const POOL_APPLICATION_NAME = 'proofline-server';

/**
 * A pool that outlives a PostgreSQL restart: a broken idle connection is reported and dropped (without
 * the error handler node-postgres would crash the process), and the next query opens a new one.
 */
export function createPool(connectionString: string, logger: Logger): pg.Pool {
  const pool = new pg.Pool({
    connectionString,
    application_name: POOL_APPLICATION_NAME,
    max: 10,
    idleTimeoutMillis: 30_000,
    connectionTimeoutMillis: 5_000,
  });
  pool.on('error', (error) => logger.warn(`database connection lost (${error.message}); it reconnects on the next request`));
  return pool;
}

export function createDatabase(pool: pg.Pool): Database {
  return drizzle({ client: pool, schema });
}

/** SQLSTATE classes and socket errors that mean "the database is not reachable right now". */
const UNAVAILABLE_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'ENOTFOUND', 'EHOSTUNREACH', '57P01', '57P02', '57P03', '53300']);

function errorChain(error: unknown): unknown[] {
  const chain: unknown[] = [];
  let current: unknown = error;
  while (current && typeof current === 'object' && chain.length < 5) {
    chain.push(current);
    current = (current as { cause?: unknown }).cause;
  }
  return chain;
}

/** Whether the error (or its cause, as Drizzle wraps driver errors) says the database is down. */
export function isDatabaseUnavailable(error: unknown): boolean {
  return errorChain(error).some((link) => {
    const { code, message } = link as { code?: unknown; message?: unknown };
    if (typeof code === 'string' && (UNAVAILABLE_CODES.has(code) || code.startsWith('08'))) return true;
    return typeof message === 'string' && /Connection terminated|timeout exceeded when trying to connect|connect ECONNREFUSED/.test(message);
  });
}

/** The constraint a unique violation (SQLSTATE 23505) broke, or null for any other error. */
export function uniqueViolation(error: unknown): string | null {
  for (const link of errorChain(error)) {
    const { code, constraint } = link as { code?: unknown; constraint?: unknown };
    if (code === '23505') return typeof constraint === 'string' ? constraint : '';
  }
  return null;
}
