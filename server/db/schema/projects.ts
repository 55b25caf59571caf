import { boolean, check, index, pgTable, primaryKey, text, uuid } from 'drizzle-orm/pg-core';
import { PROJECT_ROLES } from '../../../shared/api/projects.js';
import { oneOf } from './checks.js';
import { timestamps } from './timestamps.js';
import { users } from './users.js';

/** A plant, unit or client job holding a SIF register. */
export const projects = pgTable('projects', {
  id: uuid('id').primaryKey().defaultRandom(),
  name: text('name').notNull(),
  description: text('description').notNull().default(''),
  site: text('site').notNull().default(''),
  unit: text('unit').notNull().default(''),
  client: text('client').notNull().default(''),
  archived: boolean('archived').notNull().default(false),
  ...timestamps,
});

/** Who works on a project and in which role; a project always keeps at least one lead. */
export const projectMembers = pgTable(
  'project_members',
  {
    projectId: uuid('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: text('role', { enum: PROJECT_ROLES }).notNull(),
    ...timestamps,
  },
  (table) => [
    primaryKey({ name: 'project_members_pk', columns: [table.projectId, table.userId] }),
    index('project_members_user_idx').on(table.userId),
    check('project_members_role_valid', oneOf(table.role, PROJECT_ROLES)),
  ],
);

export type ProjectRow = typeof projects.$inferSelect;
export type NewProjectRow = typeof projects.$inferInsert;
export type ProjectMemberRow = typeof projectMembers.$inferSelect;
