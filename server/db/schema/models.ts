import { sql } from 'drizzle-orm';
import { check, index, integer, jsonb, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import type { ValidationIssue } from '../../../shared/api/errors.js';
import { MODEL_KINDS, type DraftContent } from '../../../shared/api/models.js';
import { oneOf } from './checks.js';
import { projects } from './projects.js';
import { sifs } from './sifs.js';
import { timestamps } from './timestamps.js';
import { users } from './users.js';

/**
 * Models of a SIF, each with its working draft in the row itself (content, the schema's issues with it,
 * optimistic version). project_id is kept beside sif_id so every query can be scoped to a project.
 */
export const models = pgTable(
  'models',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    projectId: uuid('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    sifId: uuid('sif_id')
      .notNull()
      .references(() => sifs.id, { onDelete: 'cascade' }),
    name: text('name').notNull(),
    kind: text('kind', { enum: MODEL_KINDS }).notNull(),
    draftContent: jsonb('draft_content').$type<DraftContent>().notNull(),
    draftIssues: jsonb('draft_issues').$type<ValidationIssue[]>().notNull(),
    draftVersion: integer('draft_version').notNull().default(1),
    draftUpdatedAt: timestamp('draft_updated_at', { withTimezone: true, mode: 'date' }).notNull().defaultNow(),
    draftUpdatedById: uuid('draft_updated_by_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    latestRevision: integer('latest_revision'),
    createdById: uuid('created_by_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    ...timestamps,
  },
  (table) => [
    index('models_sif_idx').on(table.sifId),
    index('models_project_idx').on(table.projectId),
    check('models_kind_valid', oneOf(table.kind, MODEL_KINDS)),
    check('models_draft_version_positive', sql`${table.draftVersion} >= 1`),
  ],
);

/** Issued revisions: immutable copies of a draft, numbered 1, 2, ... per model, with who, when and why. */
export const modelRevisions = pgTable(
  'model_revisions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    modelId: uuid('model_id')
      .notNull()
      .references(() => models.id, { onDelete: 'cascade' }),
    number: integer('number').notNull(),
    content: jsonb('content').$type<DraftContent>().notNull(),
    contentHash: text('content_hash').notNull(),
    reason: text('reason').notNull(),
    issuedAt: timestamp('issued_at', { withTimezone: true, mode: 'date' }).notNull().defaultNow(),
    issuedById: uuid('issued_by_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
  },
  (table) => [
    uniqueIndex('model_revisions_model_number_unique').on(table.modelId, table.number),
    check('model_revisions_number_positive', sql`${table.number} >= 1`),
  ],
);

export type ModelRow = typeof models.$inferSelect;
export type NewModelRow = typeof models.$inferInsert;
export type ModelRevisionRow = typeof modelRevisions.$inferSelect;
export type NewModelRevisionRow = typeof modelRevisions.$inferInsert;
