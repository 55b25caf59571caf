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

/** Empties every table of the foundation (and whatever references them) so each test starts clean. */
export async function resetDatabase(db: Database): Promise<void> {
  await db.execute(sql`truncate table users, projects, project_members, sifs, sessions restart identity cascade`);
}
