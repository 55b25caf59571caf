import { and, asc, count, eq, sql } from 'drizzle-orm';
import type { User } from '../../shared/api/users.js';
import type { Database } from '../db/client.js';
import { users, type NewUserRow, type UserRow } from '../db/schema/users.js';

export function toUser(row: UserRow): User {
  return { id: row.id, username: row.username, displayName: row.displayName, isAdmin: row.isAdmin, disabled: row.disabled };
}

/**
 * Accounts. Every signed-in user may see the account list (leads pick members from it); only the fields
 * of `User` leave this module, never the password hash, except through `findCredentials` for sign-in.
 */
export class UsersRepository {
  constructor(private readonly db: Database) {}

  async list(): Promise<User[]> {
    const rows = await this.db.select().from(users).orderBy(asc(users.username));
    return rows.map(toUser);
  }

  async findById(userId: string): Promise<User | null> {
    const [row] = await this.db.select().from(users).where(eq(users.id, userId));
    return row ? toUser(row) : null;
  }

  /** The account with its password hash, by username (case-insensitive); for sign-in only. */
  async findCredentials(username: string): Promise<UserRow | null> {
    const [row] = await this.db.select().from(users).where(eq(sql`lower(${users.username})`, username.toLowerCase()));
    return row ?? null;
  }

  async passwordHashOf(userId: string): Promise<string | null> {
    const [row] = await this.db.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, userId));
    return row?.passwordHash ?? null;
  }

  async insert(values: NewUserRow): Promise<User> {
    const [row] = await this.db.insert(users).values(values).returning();
    return toUser(row);
  }

  async update(userId: string, values: Partial<Pick<UserRow, 'displayName' | 'isAdmin' | 'disabled' | 'passwordHash'>>): Promise<User | null> {
    const [row] = await this.db.update(users).set(values).where(eq(users.id, userId)).returning();
    return row ? toUser(row) : null;
  }

  async countActiveAdmins(): Promise<number> {
    const [row] = await this.db
      .select({ value: count() })
      .from(users)
      .where(and(eq(users.isAdmin, true), eq(users.disabled, false)));
    return row.value;
  }
}
