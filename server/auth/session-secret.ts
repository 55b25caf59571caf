import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import type { Database } from '../db/client.js';
import { appSettings } from '../db/schema/sessions.js';

const SESSION_SECRET_KEY = 'session_secret';

/**
 * The secret that signs session cookies: generated once and kept in app_settings, so every restart (and
 * every server process on the same database) signs and accepts the same cookies.
 */
export async function storedSessionSecret(db: Database): Promise<string> {
  await db
    .insert(appSettings)
    .values({ key: SESSION_SECRET_KEY, value: randomBytes(48).toString('base64url') })
    .onConflictDoNothing({ target: appSettings.key });
  const [row] = await db.select({ value: appSettings.value }).from(appSettings).where(eq(appSettings.key, SESSION_SECRET_KEY));
  return row.value;
}
