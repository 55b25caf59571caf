import { sql } from 'drizzle-orm';
import { boolean, check, doublePrecision, index, integer, jsonb, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import type { DraftContent } from '../../../shared/api/models.js';
import { SOLVE_STATUSES, type SolveSettings } from '../../../shared/api/solves.js';
import type { SolveResult } from '../../../shared/solve-result.js';
import { modelRevisions, models } from './models.js';
import { oneOf } from './checks.js';
import { projects } from './projects.js';
import { users } from './users.js';

/**
 * Stored results, one per cache key = hash(model content hash, solver version, settings). A solve that
 * finds its key here is answered at once.
 */
export const solveResults = pgTable(
  'solve_results',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    cacheKey: text('cache_key').notNull(),
    contentHash: text('content_hash').notNull(),
    solverVersion: text('solver_version').notNull(),
    settings: jsonb('settings').$type<SolveSettings>().notNull(),
    result: jsonb('result').$type<SolveResult>().notNull(),
    createdAt: timestamp('created_at', { withTimezone: true, mode: 'date' }).notNull().defaultNow(),
  },
  (table) => [uniqueIndex('solve_results_cache_key_unique').on(table.cacheKey)],
);

/**
 * Solve jobs. `model` is the model file as it was when the solve was asked for, so a later draft save
 * cannot change what runs. The solver process that runs a job refreshes heartbeat_at; a running job whose
 * heartbeat stops (its process died) is marked failed by any other solver process.
 */
export const solves = pgTable(
  'solves',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    projectId: uuid('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    modelId: uuid('model_id')
      .notNull()
      .references(() => models.id, { onDelete: 'cascade' }),
    revisionId: uuid('revision_id').references(() => modelRevisions.id, { onDelete: 'cascade' }),
    revisionNumber: integer('revision_number'),
    draftVersion: integer('draft_version'),
    model: jsonb('model').$type<DraftContent>().notNull(),
    contentHash: text('content_hash').notNull(),
    solverVersion: text('solver_version').notNull(),
    settings: jsonb('settings').$type<SolveSettings>().notNull(),
    status: text('status', { enum: SOLVE_STATUSES }).notNull().default('queued'),
    progress: doublePrecision('progress').notNull().default(0),
    stage: text('stage'),
    error: text('error'),
    cached: boolean('cached').notNull().default(false),
    cancelRequested: boolean('cancel_requested').notNull().default(false),
    resultId: uuid('result_id').references(() => solveResults.id, { onDelete: 'set null' }),
    jobId: text('job_id'),
    workerName: text('worker_name'),
    heartbeatAt: timestamp('heartbeat_at', { withTimezone: true, mode: 'date' }),
    requestedById: uuid('requested_by_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: timestamp('created_at', { withTimezone: true, mode: 'date' }).notNull().defaultNow(),
    startedAt: timestamp('started_at', { withTimezone: true, mode: 'date' }),
    finishedAt: timestamp('finished_at', { withTimezone: true, mode: 'date' }),
  },
  (table) => [
    index('solves_model_created_idx').on(table.modelId, table.createdAt),
    index('solves_content_hash_idx').on(table.contentHash),
    index('solves_running_idx').on(table.status).where(sql`${table.status} = 'running'`),
    check('solves_status_valid', oneOf(table.status, SOLVE_STATUSES)),
    check('solves_progress_fraction', sql`${table.progress} between 0 and 1`),
    check('solves_source_one', sql`(${table.revisionNumber} is null) <> (${table.draftVersion} is null)`),
  ],
);

export type SolveResultRow = typeof solveResults.$inferSelect;
export type SolveRow = typeof solves.$inferSelect;
export type NewSolveRow = typeof solves.$inferInsert;
