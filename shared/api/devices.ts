import { z } from 'zod';
import { multiLine, recordId, singleLine, timestamp } from './common.js';
import { validationIssue } from './errors.js';
import type { ProjectRole } from './projects.js';

/**
 * The device-data library: failure data of devices (transmitters, switches, logic solvers, valves,
 * actuators, relays ...) that models link to, so each figure traces to its source and its version.
 *
 * Scope (decision): there is no workspace entity; the library is site-wide, one shared by every project
 * of this installation. Who may do what:
 * - Read (list, records, versions, export, evidence downloads): site admins and members of any project,
 *   in any role. A signed-in user who is a member of no project gets 404 for every library route, as for
 *   a project they may not see.
 * - Edit (create, new versions, CSV import, evidence uploads and removal): site admins and leads or
 *   engineers of any project that is not archived.
 *
 * - Archive, restore, delete: the same editors. Archiving hides a record from the list and the pickers
 *   (no new links), while its versions stay readable so every model that links to it still resolves; an
 *   archived record takes no new versions, imports or evidence until it is restored. Deleting removes a
 *   record with its versions and evidence, and is refused (409) while any model draft or issued revision,
 *   in any project, links to it: archive it instead.
 * - Usage (which models, drafts, revisions and events link to which version): readers, each seeing only
 *   the models of the projects they may read (their own, or all for a site admin).
 *
 * Versioning: a record is a device with numbered versions 1, 2, ...; every edit writes a new version and
 * never changes an old one. A model event links to one version (shared/model-file.ts `device`), so a
 * model keeps the figures it used until someone updates the link.
 *
 * Rates are stored per hour. Diagnostic coverage and safe failure fraction are derived from the four
 * rates, never entered, so they cannot disagree with them (definitions: IEC 61508-2:2010 Annex C,
 * DC = lambdaDD / (lambdaDD + lambdaDU), SFF = (lambdaS + lambdaDD) / lambda total).
 */

export const DEVICE_CATEGORIES = ['transmitter', 'switch', 'logic-solver', 'valve', 'actuator', 'relay', 'other'] as const;
export const deviceCategory = z.enum(DEVICE_CATEGORIES, { message: `must be one of ${DEVICE_CATEGORIES.join(', ')}` });
export type DeviceCategory = z.infer<typeof deviceCategory>;

export const DEVICE_SOURCE_KINDS = ['assessment-report', 'generic-handbook', 'prior-use', 'estimate'] as const;
export const deviceSourceKind = z.enum(DEVICE_SOURCE_KINDS, { message: `must be one of ${DEVICE_SOURCE_KINDS.join(', ')}` });
export type DeviceSourceKind = z.infer<typeof deviceSourceKind>;

export const ARCHITECTURE_TYPES = ['A', 'B'] as const;

const ratePerHour = z
  .number({ message: 'must be a number (failures per hour)' })
  .finite('must be a finite number')
  .nonnegative('must be 0 or more')
  .max(1e-2, 'must be at most 1e-2 per hour (is the unit right?)');

const fraction = z.number({ message: 'must be a number from 0 to 1' }).finite().min(0, 'must be 0 or more').max(1, 'must be 1 or less');

/** A calendar date "YYYY-MM-DD". */
export const calendarDate = z.iso.date({ message: 'must be a date YYYY-MM-DD' });

/** The figures of one version of a device record, as entered (rates per hour). */
export const deviceFields = z.strictObject({
  maker: singleLine(120, 1),
  model: singleLine(120, 1),
  category: deviceCategory,
  description: multiLine(2000).default(''),
  lambdaDU: ratePerHour,
  lambdaDD: ratePerHour,
  lambdaSU: ratePerHour,
  lambdaSD: ratePerHour,
  /** IEC 61508-2:2010 7.4.4.1.2 (A) and 7.4.4.1.3 (B). */
  architectureType: z.enum(ARCHITECTURE_TYPES, { message: 'must be A or B' }),
  /** Hardware fault tolerance of the device itself (0 for a single-channel device). */
  hardwareFaultTolerance: z.number({ message: 'must be a whole number 0 to 3' }).int('must be a whole number').min(0, 'must be 0 or more').max(3, 'must be 3 or less'),
  /** SC 1 to 4 (IEC 61508-2:2010 7.6.2.7); null when not claimed. */
  systematicCapability: z.number({ message: 'must be 1 to 4' }).int('must be a whole number').min(1, 'must be 1 or more').max(4, 'must be 4 or less').nullable(),
  /** Suggested proof-test coverage, 0 to 1; null when the source gives none. */
  proofTestCoverage: fraction.nullable(),
  /** Useful life in years; null when not stated. */
  usefulLifeYears: z.number({ message: 'must be a number of years' }).finite().positive('must be more than 0').max(100, 'must be 100 years or less').nullable(),
  sourceKind: deviceSourceKind,
  /** Report number, handbook table, prior-use record ... */
  sourceReference: singleLine(500, 1),
  /** The source is valid until this date; null when open-ended. */
  validUntil: calendarDate.nullable(),
});
export type DeviceFields = z.infer<typeof deviceFields>;
export type DeviceFieldsInput = z.input<typeof deviceFields>;

/** Diagnostic coverage and safe failure fraction, derived from the rates (IEC 61508-2:2010 Annex C). */
export function derivedFractions(rates: Pick<DeviceFields, 'lambdaDU' | 'lambdaDD' | 'lambdaSU' | 'lambdaSD'>): {
  diagnosticCoverage: number | null;
  safeFailureFraction: number | null;
} {
  const dangerous = rates.lambdaDU + rates.lambdaDD;
  const total = dangerous + rates.lambdaSU + rates.lambdaSD;
  return {
    diagnosticCoverage: dangerous > 0 ? rates.lambdaDD / dangerous : null,
    safeFailureFraction: total > 0 ? (total - rates.lambdaDU) / total : null,
  };
}

/** One stored version of a record: its figures, the derived fractions, who wrote it and why. (A reply, so not strict.) */
export const deviceVersion = z.object(deviceFields.shape).extend({
  deviceId: recordId,
  version: z.number().int().min(1),
  diagnosticCoverage: z.number().nullable(),
  safeFailureFraction: z.number().nullable(),
  changeNote: z.string(),
  createdAt: timestamp,
  createdById: recordId,
  createdByDisplayName: z.string(),
});
export type DeviceVersion = z.infer<typeof deviceVersion>;

export const deviceVersionList = z.array(deviceVersion);
export type DeviceVersionList = z.infer<typeof deviceVersionList>;

/** A piece of evidence (certificate, assessment report) attached to a record. */
export const EVIDENCE_CONTENT_TYPES = ['application/pdf', 'image/png', 'image/jpeg'] as const;
export const evidenceContentType = z.enum(EVIDENCE_CONTENT_TYPES);
/** Largest evidence file accepted: 10 MiB. */
export const MAX_EVIDENCE_BYTES = 10 * 1024 * 1024;

export const deviceEvidence = z.object({
  id: recordId,
  deviceId: recordId,
  /** The record version that was current when the file was attached. */
  deviceVersion: z.number().int().min(1),
  fileName: z.string(),
  contentType: evidenceContentType,
  byteSize: z.number().int().min(1),
  /** SHA-256 of the file, hex. */
  sha256: z.string(),
  description: z.string(),
  uploadedAt: timestamp,
  uploadedById: recordId,
  uploadedByDisplayName: z.string(),
});
export type DeviceEvidence = z.infer<typeof deviceEvidence>;

/** The multipart text field sent beside the `file` field of an upload. */
export const uploadEvidenceFields = z.strictObject({ description: multiLine(500).default('') });

/** The current version of a record, as the library lists it. */
export const deviceSummary = deviceVersion.extend({
  id: recordId,
  evidenceCount: z.number().int().min(0),
  /** When the record was archived (hidden from the pickers, still readable); null while in use. */
  archivedAt: timestamp.nullable().default(null),
});
export type DeviceSummary = z.infer<typeof deviceSummary>;

export const deviceList = z.array(deviceSummary);
export type DeviceList = z.infer<typeof deviceList>;

export const deviceDetail = deviceSummary.extend({ evidence: z.array(deviceEvidence) });
export type DeviceDetail = z.infer<typeof deviceDetail>;

/** Which records a list shows: active ones (default), archived ones too, or archived ones only. */
export const DEVICE_ARCHIVE_FILTERS = ['active', 'all', 'archived'] as const;

/**
 * GET /api/devices: optional text search (maker, model, description), category, archive filter, and a
 * list of ids. With ids the archive filter defaults to all, so the records a model links to resolve.
 */
export const deviceListQuery = z.object({
  search: singleLine(120).optional(),
  category: deviceCategory.optional(),
  archived: z.enum(DEVICE_ARCHIVE_FILTERS, { message: `must be one of ${DEVICE_ARCHIVE_FILTERS.join(', ')}` }).optional(),
  /** Comma-separated record ids, e.g. to check the records a model links to. */
  ids: z
    .string()
    .optional()
    .transform((text) => (text ? text.split(',').map((id) => id.trim()).filter((id) => id !== '') : undefined))
    .pipe(z.array(recordId).max(500, 'at most 500 ids').optional()),
});
export type DeviceListQuery = z.input<typeof deviceListQuery>;

/** POST /api/devices: a new record (version 1). */
export const createDeviceBody = deviceFields.extend({ changeNote: multiLine(2000).default('') });
export type CreateDeviceBody = z.input<typeof createDeviceBody>;

/** PUT /api/devices/:deviceId: writes version `basedOnVersion + 1`; a stale version is a 409. */
export const updateDeviceBody = deviceFields.extend({
  basedOnVersion: z.number({ message: 'must be the version you read' }).int('must be a whole number').min(1, 'must be 1 or more'),
  changeNote: multiLine(2000, 1),
});
export type UpdateDeviceBody = z.input<typeof updateDeviceBody>;

/** details of the 409 version_conflict of a stale edit: the record as stored now. */
export const deviceConflictDetails = z.object({ current: deviceDetail });

// CSV import -----------------------------------------------------------------------------------------

/** The record fields a CSV column can be mapped to. */
export const IMPORT_FIELDS = [
  'maker',
  'model',
  'category',
  'description',
  'lambdaDU',
  'lambdaDD',
  'lambdaSU',
  'lambdaSD',
  'architectureType',
  'hardwareFaultTolerance',
  'systematicCapability',
  'proofTestCoverage',
  'usefulLifeYears',
  'sourceKind',
  'sourceReference',
  'validUntil',
] as const satisfies readonly (keyof DeviceFields)[];
export type ImportField = (typeof IMPORT_FIELDS)[number];
export const RATE_FIELDS = ['lambdaDU', 'lambdaDD', 'lambdaSU', 'lambdaSD'] as const;

/** Units of the rate columns of a CSV file. 1 FIT = 1e-9 per hour; a year is 8760 h (common practice). */
export const IMPORT_RATE_UNITS = ['perHour', 'fit', 'perYear'] as const;
export const importRateUnit = z.enum(IMPORT_RATE_UNITS, { message: 'must be perHour, fit or perYear' });
export type ImportRateUnit = z.infer<typeof importRateUnit>;
export const PER_HOUR_FACTOR: Record<ImportRateUnit, number> = { perHour: 1, fit: 1e-9, perYear: 1 / 8760 };

/** Largest CSV accepted: 900 000 characters (the API takes JSON bodies up to 1 MB), 5000 rows. */
export const MAX_IMPORT_CSV_CHARS = 900_000;
export const MAX_IMPORT_ROWS = 5000;

/**
 * Column mapping: record field -> CSV header. Fields left out are taken from the column of the same
 * name (the export's headers), when the file has one.
 */
export const importMapping = z.partialRecord(z.enum(IMPORT_FIELDS), singleLine(200, 1));
export type ImportMapping = z.infer<typeof importMapping>;

export const importPreviewBody = z.strictObject({
  csv: z.string().min(1, 'must not be empty').max(MAX_IMPORT_CSV_CHARS, `must be at most ${MAX_IMPORT_CSV_CHARS} characters`),
  mapping: importMapping.default({}),
  rateUnit: importRateUnit,
});
export type ImportPreviewBody = z.input<typeof importPreviewBody>;

/**
 * How a row is treated: new (a new record), new-version (a record with the same maker and model
 * exists and the figures differ), unchanged (same maker, model and figures), duplicate-in-file (an
 * earlier row has the same maker and model), invalid (errors).
 */
export const IMPORT_ROW_OUTCOMES = ['new', 'new-version', 'unchanged', 'duplicate-in-file', 'invalid'] as const;
export const importRowOutcome = z.enum(IMPORT_ROW_OUTCOMES);
export type ImportRowOutcome = z.infer<typeof importRowOutcome>;

export const importPreviewRow = z.object({
  /** 1-based line of the row in the file, the header being line 1. */
  line: z.number().int().min(2),
  /** The cells as read, by record field (what was in the file, before units). */
  cells: z.partialRecord(z.enum(IMPORT_FIELDS), z.string()),
  /** The parsed record (rates per hour) when the row is valid. */
  fields: deviceFields.nullable(),
  outcome: importRowOutcome,
  /** For new-version / unchanged: the existing record and its current version. */
  existing: z.object({ id: recordId, version: z.number().int().min(1) }).nullable(),
  /** For duplicate-in-file: the line of the first row with the same maker and model. */
  duplicateOfLine: z.number().int().nullable(),
  /** Each problem of the row, by field (path = record field name). */
  errors: z.array(validationIssue),
});
export type ImportPreviewRow = z.infer<typeof importPreviewRow>;

export const importPreview = z.object({
  headers: z.array(z.string()),
  /** The mapping used: every field and the header it was read from (null: no column). */
  mapping: z.record(z.enum(IMPORT_FIELDS), z.string().nullable()),
  rateUnit: importRateUnit,
  rows: z.array(importPreviewRow),
  /** Problems of the file as a whole (no header, a mapped header missing, too many rows). */
  fileErrors: z.array(z.string()),
  counts: z.record(importRowOutcome, z.number().int().min(0)),
});
export type ImportPreview = z.infer<typeof importPreview>;

/**
 * POST /api/devices/import/confirm: the same file, mapping and unit as the preview. Rows that would be
 * new records or new versions are written in one transaction; unchanged and duplicate rows are skipped.
 * Invalid rows refuse the whole import (400, each row and field named) unless skipInvalidRows is true.
 */
export const importConfirmBody = importPreviewBody.extend({
  skipInvalidRows: z.boolean().default(false),
  /** Import rows matching an existing record as its new version (default) or skip them. */
  existingRecords: z.enum(['new-version', 'skip']).default('new-version'),
});
export type ImportConfirmBody = z.input<typeof importConfirmBody>;

export const importResult = z.object({
  created: z.number().int().min(0),
  newVersions: z.number().int().min(0),
  skipped: z.number().int().min(0),
});
export type ImportResult = z.infer<typeof importResult>;

/** The CSV columns of GET /api/devices/export (rates per hour); the import reads the same headers. */
export const EXPORT_COLUMNS = ['id', 'version', ...IMPORT_FIELDS, 'diagnosticCoverage', 'safeFailureFraction'] as const;

// Where records are used ----------------------------------------------------------------------------

/** Where a model links to a record: its working draft or one of its issued revisions. */
export const DEVICE_USAGE_PLACES = ['draft', 'revision'] as const;

/** One event of one model (draft or issued revision) that links to the record. */
export const deviceUsageEntry = z.object({
  projectId: recordId,
  projectName: z.string(),
  projectArchived: z.boolean(),
  sifId: recordId,
  sifTag: z.string(),
  modelId: recordId,
  modelName: z.string(),
  place: z.enum(DEVICE_USAGE_PLACES),
  /** The draft version, or the revision number. */
  placeNumber: z.number().int().min(1),
  eventId: z.string(),
  eventLabel: z.string().nullable(),
  /** The record version the event links to. */
  linkedVersion: z.number().int().min(1),
  /** Linked fields the event overrides (each with its reason in the model). */
  overriddenFields: z.array(z.string()),
});
export type DeviceUsageEntry = z.infer<typeof deviceUsageEntry>;

/** GET /api/devices/:deviceId/usage: the uses the caller may see, by project, SIF, model, place and event. */
export const deviceUsage = z.object({
  deviceId: recordId,
  currentVersion: z.number().int().min(1),
  entries: z.array(deviceUsageEntry),
});
export type DeviceUsage = z.infer<typeof deviceUsage>;

/** Roles (in any project) that edit the library. */
export const DEVICE_EDIT_ROLES = ['lead', 'engineer'] as const satisfies readonly ProjectRole[];

/** Whether a user with these project roles (in any project) and admin flag may edit the library. */
export function canEditDevices(activeProjectRoles: readonly ProjectRole[], isAdmin: boolean): boolean {
  return isAdmin || activeProjectRoles.some((role) => (DEVICE_EDIT_ROLES as readonly ProjectRole[]).includes(role));
}

/** GET /api/devices/access: what the signed-in user may do in the library. */
export const deviceLibraryAccess = z.object({ canRead: z.boolean(), canEdit: z.boolean() });
export type DeviceLibraryAccess = z.infer<typeof deviceLibraryAccess>;
