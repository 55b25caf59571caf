import { sql } from 'drizzle-orm';
import { check, customType, date, doublePrecision, index, integer, pgTable, smallint, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { ARCHITECTURE_TYPES, DEVICE_CATEGORIES, DEVICE_SOURCE_KINDS, EVIDENCE_CONTENT_TYPES } from '../../../shared/api/devices.js';
import { oneOf } from './checks.js';
import { timestamps } from './timestamps.js';
import { users } from './users.js';

/** PostgreSQL bytea as a Node Buffer (node-postgres reads bytea into a Buffer). */
const bytea = customType<{ data: Buffer; driverData: Buffer }>({
  dataType: () => 'bytea',
});

/**
 * Records of the site-wide device-data library (shared/api/devices.ts). The identity of a record is its
 * maker and model (case-insensitive, unique); its figures live in numbered versions, and
 * current_version names the latest. An archived record (archived_at set) is hidden from the pickers
 * and the list but stays readable, so the models that link to it still resolve.
 */
export const devices = pgTable(
  'devices',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    maker: text('maker').notNull(),
    model: text('model').notNull(),
    currentVersion: integer('current_version').notNull().default(1),
    createdById: uuid('created_by_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    archivedAt: timestamp('archived_at', { withTimezone: true, mode: 'date' }),
    archivedById: uuid('archived_by_id').references(() => users.id, { onDelete: 'restrict' }),
    ...timestamps,
  },
  (table) => [
    uniqueIndex('devices_maker_model_unique').on(sql`lower(${table.maker})`, sql`lower(${table.model})`),
    check('devices_current_version_positive', sql`${table.currentVersion} >= 1`),
    check('devices_archived_by_with_date', sql`(${table.archivedAt} is null) = (${table.archivedById} is null)`),
  ],
);

/** Immutable versions of a record: every edit inserts one, nothing updates or deletes them. */
export const deviceVersions = pgTable(
  'device_versions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    deviceId: uuid('device_id')
      .notNull()
      .references(() => devices.id, { onDelete: 'cascade' }),
    version: integer('version').notNull(),
    maker: text('maker').notNull(),
    model: text('model').notNull(),
    category: text('category', { enum: DEVICE_CATEGORIES }).notNull(),
    description: text('description').notNull().default(''),
    lambdaDU: doublePrecision('lambda_du').notNull(),
    lambdaDD: doublePrecision('lambda_dd').notNull(),
    lambdaSU: doublePrecision('lambda_su').notNull(),
    lambdaSD: doublePrecision('lambda_sd').notNull(),
    architectureType: text('architecture_type', { enum: ARCHITECTURE_TYPES }).notNull(),
    hardwareFaultTolerance: smallint('hardware_fault_tolerance').notNull(),
    systematicCapability: smallint('systematic_capability'),
    proofTestCoverage: doublePrecision('proof_test_coverage'),
    usefulLifeYears: doublePrecision('useful_life_years'),
    sourceKind: text('source_kind', { enum: DEVICE_SOURCE_KINDS }).notNull(),
    sourceReference: text('source_reference').notNull(),
    validUntil: date('valid_until', { mode: 'string' }),
    changeNote: text('change_note').notNull().default(''),
    createdAt: timestamp('created_at', { withTimezone: true, mode: 'date' }).notNull().defaultNow(),
    createdById: uuid('created_by_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
  },
  (table) => [
    uniqueIndex('device_versions_device_version_unique').on(table.deviceId, table.version),
    check('device_versions_version_positive', sql`${table.version} >= 1`),
    check('device_versions_category_valid', oneOf(table.category, DEVICE_CATEGORIES)),
    check('device_versions_architecture_type_valid', oneOf(table.architectureType, ARCHITECTURE_TYPES)),
    check('device_versions_source_kind_valid', oneOf(table.sourceKind, DEVICE_SOURCE_KINDS)),
    check(
      'device_versions_rates_nonnegative',
      sql`${table.lambdaDU} >= 0 and ${table.lambdaDD} >= 0 and ${table.lambdaSU} >= 0 and ${table.lambdaSD} >= 0`,
    ),
    check('device_versions_hft_range', sql`${table.hardwareFaultTolerance} between 0 and 3`),
    check('device_versions_sc_range', sql`${table.systematicCapability} is null or ${table.systematicCapability} between 1 and 4`),
    check('device_versions_ptc_range', sql`${table.proofTestCoverage} is null or ${table.proofTestCoverage} between 0 and 1`),
  ],
);

/** Evidence files (certificates, assessment reports) of a record, the bytes kept in the database. */
export const deviceEvidence = pgTable(
  'device_evidence',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    deviceId: uuid('device_id')
      .notNull()
      .references(() => devices.id, { onDelete: 'cascade' }),
    deviceVersion: integer('device_version').notNull(),
    fileName: text('file_name').notNull(),
    contentType: text('content_type', { enum: EVIDENCE_CONTENT_TYPES }).notNull(),
    byteSize: integer('byte_size').notNull(),
    sha256: text('sha256').notNull(),
    description: text('description').notNull().default(''),
    content: bytea('content').notNull(),
    uploadedAt: timestamp('uploaded_at', { withTimezone: true, mode: 'date' }).notNull().defaultNow(),
    uploadedById: uuid('uploaded_by_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
  },
  (table) => [
    index('device_evidence_device_idx').on(table.deviceId),
    check('device_evidence_content_type_valid', oneOf(table.contentType, EVIDENCE_CONTENT_TYPES)),
    check('device_evidence_byte_size_positive', sql`${table.byteSize} > 0`),
  ],
);

export type DeviceRow = typeof devices.$inferSelect;
export type DeviceVersionRow = typeof deviceVersions.$inferSelect;
export type NewDeviceVersionRow = typeof deviceVersions.$inferInsert;
export type DeviceEvidenceRow = typeof deviceEvidence.$inferSelect;
