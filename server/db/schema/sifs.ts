import { sql } from 'drizzle-orm';
import { boolean, check, doublePrecision, integer, pgTable, smallint, text, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { SIF_TARGET_KINDS, SIF_DEMAND_MODES } from '../../../shared/api/sif-target.js';
import { SIF_STATUSES } from '../../../shared/api/sifs.js';
import { oneOf } from './checks.js';
import { projects } from './projects.js';
import { timestamps } from './timestamps.js';
import { users } from './users.js';

/**
 * The SIF register. The target is stored once (target_kind, target_value); target_sil is the SIL derived
 * from it by shared/api/sif-target.ts, kept only so the register can sort by SIL.
 */
export const sifs = pgTable(
  'sifs',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    projectId: uuid('project_id')
      .notNull()
      .references(() => projects.id, { onDelete: 'cascade' }),
    tag: text('tag').notNull(),
    title: text('title').notNull(),
    hazardousEvent: text('hazardous_event').notNull(),
    demandMode: text('demand_mode', { enum: SIF_DEMAND_MODES }).notNull(),
    targetKind: text('target_kind', { enum: SIF_TARGET_KINDS }).notNull(),
    targetValue: doublePrecision('target_value').notNull(),
    targetSil: smallint('target_sil').notNull(),
    demandRatePerYear: doublePrecision('demand_rate_per_year'),
    missionHours: doublePrecision('mission_hours').notNull(),
    status: text('status', { enum: SIF_STATUSES }).notNull().default('draft'),
    ownerId: uuid('owner_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    version: integer('version').notNull().default(1),
    archived: boolean('archived').notNull().default(false),
    ...timestamps,
  },
  (table) => [
    uniqueIndex('sifs_project_tag_unique').on(table.projectId, sql`lower(${table.tag})`),
    check('sifs_demand_mode_valid', oneOf(table.demandMode, SIF_DEMAND_MODES)),
    check('sifs_target_kind_valid', oneOf(table.targetKind, SIF_TARGET_KINDS)),
    check('sifs_status_valid', oneOf(table.status, SIF_STATUSES)),
    check('sifs_target_sil_valid', sql`${table.targetSil} between 1 and 4`),
    check('sifs_target_value_positive', sql`${table.targetValue} > 0`),
    check('sifs_mission_hours_positive', sql`${table.missionHours} > 0`),
    check('sifs_version_positive', sql`${table.version} >= 1`),
  ],
);

export type SifRow = typeof sifs.$inferSelect;
export type NewSifRow = typeof sifs.$inferInsert;
