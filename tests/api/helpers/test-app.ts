import type { Express } from 'express';
import request from 'supertest';
import { createApp, type AppDeps } from '../../../server/app.js';
import type { TestDatabase } from './test-database.js';
import { passwordOf } from './world.js';

export const TEST_SESSION_SECRET = 'test-session-secret-of-at-least-32-characters';

/** An app on the test database; sign-in limits are raised so only the rate-limit test meets them. */
export function createTestApp(database: TestDatabase, overrides: Partial<AppDeps> = {}): Express {
  return createApp({
    db: database.db,
    pool: database.pool,
    logger: database.logger,
    sessionSecret: TEST_SESSION_SECRET,
    signInLimit: { failures: 1000, windowMinutes: 15 },
    ...overrides,
  });
}

/** A supertest agent (keeps cookies) signed in as a world user. */
export async function signedInAgent(app: Express, username: string, password = passwordOf(username)) {
  const agent = request.agent(app);
  const response = await agent.post('/api/auth/sign-in').send({ username, password });
  if (response.status !== 200) throw new Error(`sign-in of ${username} failed: ${response.status} ${JSON.stringify(response.body)}`);
  return agent;
}

/** The session cookie ("proofline.sid=...") a response set, or null. */
export function sessionCookie(response: request.Response): string | null {
  const header = response.headers['set-cookie'] as unknown as string[] | undefined;
  const cookie = header?.find((value) => value.startsWith('proofline.sid='));
  return cookie ? cookie.split(';')[0] : null;
}
