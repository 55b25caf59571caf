import { sql } from 'drizzle-orm';
import { boolean, pgTable, text, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { timestamps } from './timestamps.js';

/** Accounts. password_hash holds "scrypt$N$r$p$salt$hash" (server/auth/passwords.ts). */
export const users = pgTable(
  'users',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    username: text('username').notNull(),
    displayName: text('display_name').notNull(),
    passwordHash: text('password_hash').notNull(),
    isAdmin: boolean('is_admin').notNull().default(false),
    disabled: boolean('disabled').notNull().default(false),
    ...timestamps,
  },
  (table) => [uniqueIndex('users_username_unique').on(sql`lower(${table.username})`)],
);

export type UserRow = typeof users.$inferSelect;
export type NewUserRow = typeof users.$inferInsert;
