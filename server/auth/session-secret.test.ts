import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openTestDatabase, type TestDatabase } from '../../tests/api/helpers/test-database.js';
import { storedSessionSecret } from './session-secret.js';

let database: TestDatabase;

beforeAll(async () => {
  database = await openTestDatabase();
  await database.db.execute(sql`delete from app_settings where key = 'session_secret'`);
});
afterAll(async () => database.close());

describe('storedSessionSecret', () => {
  it('generates a long secret once and returns the same one to every later start', async () => {
    const [first, second] = await Promise.all([storedSessionSecret(database.db), storedSessionSecret(database.db)]);
    expect(first.length).toBeGreaterThanOrEqual(64);
    expect(second).toBe(first);
    expect(await storedSessionSecret(database.db)).toBe(first);
  });
});
