import { and, eq, ne, sql } from 'drizzle-orm';
import type { Database } from '../db/client.js';
import { sessions } from '../db/schema/sessions.js';

/** The stored sessions of connect-pg-simple; passport keeps the user id at sess.passport.user. */
export class SessionsRepository {
  constructor(private readonly db: Database) {}

  /** Ends every session of the user, except the one with id `keepSid` when given. */
  async endSessionsOf(userId: string, keepSid?: string): Promise<void> {
    const ofUser = eq(sql`${sessions.sess}->'passport'->>'user'`, userId);
    await this.db.delete(sessions).where(keepSid ? and(ofUser, ne(sessions.sid, keepSid)) : ofUser);
  }
}
