import { Passport } from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { Database } from '../db/client.js';
import { UsersRepository, toUser } from '../users/users-repository.js';
import { unmatchableHash, verifyPassword } from './passwords.js';

/**
 * One passport instance per app (not the module singleton), so two apps in one process stay apart.
 * The session holds only the user id; the account is read again on every request, so disabling a user
 * or removing admin rights takes effect at once.
 */
export function createPassport(db: Database): InstanceType<typeof Passport> {
  const passport = new Passport();
  const users = new UsersRepository(db);

  passport.use(
    new LocalStrategy({ usernameField: 'username', passwordField: 'password', session: true }, (username, password, done) => {
      (async () => {
        const row = await users.findCredentials(username);
        const matches = await verifyPassword(password, row?.passwordHash ?? (await unmatchableHash()));
        if (!row || !matches || row.disabled) return false as const;
        return toUser(row);
      })().then(
        (user) => done(null, user),
        (error: unknown) => done(error),
      );
    }),
  );

  passport.serializeUser((user, done) => done(null, user.id));
  passport.deserializeUser((id: string, done) => {
    users.findById(id).then(
      (user) => done(null, user && !user.disabled ? user : false),
      (error: unknown) => done(error),
    );
  });
  return passport;
}
