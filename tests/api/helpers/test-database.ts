import { sql } from 'drizzle-orm';
import type pg from 'pg';
import { createDatabase, createPool, type Database, type Logger } from '../../../server/db/client.js';
import { runMigrations } from '../../../server/db/migrate.js';

/** The test database: scripts/test.sh sets DATABASE_URL to $DB_BASE_URL/proofline_test. */
export function testDatabaseUrl(): string {
  const url = process.env.DATABASE_URL;
  if (!url) {
    throw new Error(
      'DATABASE_URL is not set: run `source scripts/db.sh && db_start proofline_test` and ' +
        'DATABASE_URL="$DB_BASE_URL/proofline_test" npx vitest run tests/api server',
    );
  }
  return url;
}

export interface TestDatabase {
  readonly pool: pg.Pool;
  readonly db: Database;
  readonly logger: RecordingLogger;
  close(): Promise<void>;
}

export interface RecordingLogger extends Logger {
  readonly lines: string[];
}

/** Keeps warnings for assertions; unexpected errors are printed too, so a failing test shows them. */
export function recordingLogger(): RecordingLogger {
  const lines: string[] = [];
  return {
    lines,
    info: (message) => lines.push(`info ${message}`),
    warn: (message) => lines.push(`warn ${message}`),
    error: (message, error) => {
      lines.push(`error ${message}`);
      console.error(message, error);
    },
  };
}

export async function openTestDatabase(url = testDatabaseUrl()): Promise<TestDatabase> {
  const logger = recordingLogger();
  const pool = createPool(url, logger);
  const db = createDatabase(pool);
  await runMigrations(db);
  return { pool, db, logger, close: () => pool.end() };
}

/**
 * Empties the foundation's tables so each test starts clean. Deleting projects cascades to their members,
 * SIFs and everything hanging off them (foreign keys with ON DELETE CASCADE); then no row refers to a
 * user any more. DELETE on these small tables is several times faster than TRUNCATE, which rewrites files.
 * A new table that refers to users but not through a project must be emptied here before users.
 */
export async function resetDatabase(db: Database): Promise<void> {
  await db.transaction(async (tx) => {
    await tx.execute(sql`delete from sessions`);
    await tx.execute(sql`delete from projects`);
    await tx.execute(sql`delete from devices`);
    await tx.execute(sql`delete from users`);
  });
}
