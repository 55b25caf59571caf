import { index, json, pgTable, text, timestamp, varchar } from 'drizzle-orm/pg-core';
import { timestamps } from './timestamps.js';

/** Sessions of connect-pg-simple (its expected columns: sid, sess, expire). */
export const sessions = pgTable(
  'sessions',
  {
    sid: varchar('sid').primaryKey(),
    sess: json('sess').notNull(),
    expire: timestamp('expire', { withTimezone: true, precision: 6 }).notNull(),
  },
  (table) => [index('sessions_expire_idx').on(table.expire)],
);

/** Settings of this installation, e.g. the generated session secret. */
export const appSettings = pgTable('app_settings', {
  key: text('key').primaryKey(),
  value: text('value').notNull(),
  ...timestamps,
});
