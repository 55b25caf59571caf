import { and, asc, count, desc, eq, exists, ilike, inArray, isNotNull, isNull, or, sql, type SQL } from 'drizzle-orm';
import {
  derivedFractions,
  type DeviceEvidence,
  type DeviceFields,
  type DeviceSummary,
  type DeviceVersion,
  DEVICE_ARCHIVE_FILTERS,
} from '../../shared/api/devices.js';
import type { DraftContent } from '../../shared/api/models.js';
import type { ProjectRole } from '../../shared/api/projects.js';
import type { Queryable } from '../db/client.js';
import { deviceEvidence, devices, deviceVersions, type DeviceEvidenceRow, type DeviceVersionRow } from '../db/schema/devices.js';
import { modelRevisions, models } from '../db/schema/models.js';
import { projectMembers, projects } from '../db/schema/projects.js';
import { sifs } from '../db/schema/sifs.js';
import { users } from '../db/schema/users.js';

export interface DeviceFilter {
  readonly search?: string;
  readonly category?: DeviceFields['category'];
  readonly ids?: readonly string[];
  /** Default all: the service hides archived records where the user picks. */
  readonly archived?: (typeof DEVICE_ARCHIVE_FILTERS)[number];
}

/** Whose models a usage query may see: a member's projects, or every project (site admin, or the delete check). */
export type UsageScope = { readonly memberId: string } | 'every-project';

/** A model draft or issued revision whose content links to the record, with where it lives. */
export interface LinkingModel {
  readonly projectId: string;
  readonly projectName: string;
  readonly projectArchived: boolean;
  readonly sifId: string;
  readonly sifTag: string;
  readonly modelId: string;
  readonly modelName: string;
  readonly place: 'draft' | 'revision';
  readonly placeNumber: number;
  readonly content: DraftContent;
}

/** A new version to write: its figures and note, by whom. */
export interface VersionToWrite {
  readonly fields: DeviceFields;
  readonly changeNote: string;
  readonly userId: string;
}

function toVersion(row: DeviceVersionRow, authorName: string): DeviceVersion {
  return {
    deviceId: row.deviceId,
    version: row.version,
    maker: row.maker,
    model: row.model,
    category: row.category,
    description: row.description,
    lambdaDU: row.lambdaDU,
    lambdaDD: row.lambdaDD,
    lambdaSU: row.lambdaSU,
    lambdaSD: row.lambdaSD,
    ...derivedFractions(row),
    architectureType: row.architectureType,
    hardwareFaultTolerance: row.hardwareFaultTolerance,
    systematicCapability: row.systematicCapability,
    proofTestCoverage: row.proofTestCoverage,
    usefulLifeYears: row.usefulLifeYears,
    sourceKind: row.sourceKind,
    sourceReference: row.sourceReference,
    validUntil: row.validUntil,
    changeNote: row.changeNote,
    createdAt: row.createdAt.toISOString(),
    createdById: row.createdById,
    createdByDisplayName: authorName,
  };
}

function toEvidence(row: Omit<DeviceEvidenceRow, 'content'>, uploaderName: string): DeviceEvidence {
  return {
    id: row.id,
    deviceId: row.deviceId,
    deviceVersion: row.deviceVersion,
    fileName: row.fileName,
    contentType: row.contentType,
    byteSize: row.byteSize,
    sha256: row.sha256,
    description: row.description,
    uploadedAt: row.uploadedAt.toISOString(),
    uploadedById: row.uploadedById,
    uploadedByDisplayName: uploaderName,
  };
}

const evidenceColumns = {
  id: deviceEvidence.id,
  deviceId: deviceEvidence.deviceId,
  deviceVersion: deviceEvidence.deviceVersion,
  fileName: deviceEvidence.fileName,
  contentType: deviceEvidence.contentType,
  byteSize: deviceEvidence.byteSize,
  sha256: deviceEvidence.sha256,
  description: deviceEvidence.description,
  uploadedAt: deviceEvidence.uploadedAt,
  uploadedById: deviceEvidence.uploadedById,
};

/** Escapes LIKE wildcards so a search for "10%" finds that text. */
function likePattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (character) => `\\${character}`)}%`;
}

/**
 * Queries of the site-wide library. The library has no per-project scope: the service decides from
 * `rolesOf` whether the user may read or edit at all, then every query here sees the whole library.
 */
export function deviceRepository(db: Queryable) {
  const currentVersionJoin = and(eq(deviceVersions.deviceId, devices.id), eq(deviceVersions.version, devices.currentVersion));

  /** The record's current version and whether it is archived (locked for the transaction when asked). */
  async function recordState(deviceId: string, forUpdate = false): Promise<{ currentVersion: number; archived: boolean } | undefined> {
    const query = db.select({ currentVersion: devices.currentVersion, archivedAt: devices.archivedAt }).from(devices).where(eq(devices.id, deviceId));
    const [row] = forUpdate ? await query.for('update') : await query;
    return row ? { currentVersion: row.currentVersion, archived: row.archivedAt !== null } : undefined;
  }

  return {
    /** The user's roles in projects that are not archived (one entry per membership). */
    async activeRolesOf(userId: string): Promise<ProjectRole[]> {
      const rows = await db
        .select({ role: projectMembers.role })
        .from(projectMembers)
        .innerJoin(projects, eq(projects.id, projectMembers.projectId))
        .where(and(eq(projectMembers.userId, userId), eq(projects.archived, false)));
      return rows.map((row) => row.role);
    },

    /** The projects the user is a member of (archived or not). */
    async projectIdsOf(userId: string): Promise<string[]> {
      const rows = await db.select({ projectId: projectMembers.projectId }).from(projectMembers).where(eq(projectMembers.userId, userId));
      return rows.map((row) => row.projectId);
    },

    /** Whether the user is a member of any project, archived or not. */
    async isMemberAnywhere(userId: string): Promise<boolean> {
      const [row] = await db.select({ n: count() }).from(projectMembers).where(eq(projectMembers.userId, userId));
      return (row?.n ?? 0) > 0;
    },

    async list(filter: DeviceFilter): Promise<DeviceSummary[]> {
      const conditions: SQL[] = [];
      if (filter.search) {
        const pattern = likePattern(filter.search);
        const match = or(ilike(deviceVersions.maker, pattern), ilike(deviceVersions.model, pattern), ilike(deviceVersions.description, pattern));
        if (match) conditions.push(match);
      }
      if (filter.category) conditions.push(eq(deviceVersions.category, filter.category));
      if (filter.ids) conditions.push(filter.ids.length > 0 ? inArray(devices.id, [...filter.ids]) : sql`false`);
      if (filter.archived === 'active') conditions.push(isNull(devices.archivedAt));
      if (filter.archived === 'archived') conditions.push(isNotNull(devices.archivedAt));
      const evidenceCount = db
        .select({ deviceId: deviceEvidence.deviceId, n: count().as('n') })
        .from(deviceEvidence)
        .groupBy(deviceEvidence.deviceId)
        .as('evidence_count');
      const rows = await db
        .select({ version: deviceVersions, authorName: users.displayName, evidenceCount: evidenceCount.n, archivedAt: devices.archivedAt })
        .from(devices)
        .innerJoin(deviceVersions, currentVersionJoin)
        .innerJoin(users, eq(users.id, deviceVersions.createdById))
        .leftJoin(evidenceCount, eq(evidenceCount.deviceId, devices.id))
        .where(conditions.length > 0 ? and(...conditions) : undefined)
        .orderBy(asc(sql`lower(${deviceVersions.maker})`), asc(sql`lower(${deviceVersions.model})`));
      return rows.map((row) => ({
        ...toVersion(row.version, row.authorName),
        id: row.version.deviceId,
        evidenceCount: Number(row.evidenceCount ?? 0),
        archivedAt: row.archivedAt?.toISOString() ?? null,
      }));
    },

    async currentVersionNumber(deviceId: string, forUpdate = false): Promise<number | undefined> {
      return (await recordState(deviceId, forUpdate))?.currentVersion;
    },

    state: recordState,

    /** Archives (userId) or restores (null) a record; false when there is no such record. */
    async setArchived(deviceId: string, userId: string | null): Promise<boolean> {
      const changed = await db
        .update(devices)
        .set(userId === null ? { archivedAt: null, archivedById: null } : { archivedAt: sql`now()`, archivedById: userId })
        .where(eq(devices.id, deviceId))
        .returning({ id: devices.id });
      return changed.length > 0;
    },

    /** Deletes a record with its versions and evidence (cascade). */
    async deleteDevice(deviceId: string): Promise<boolean> {
      const removed = await db.delete(devices).where(eq(devices.id, deviceId)).returning({ id: devices.id });
      return removed.length > 0;
    },

    /**
     * The model drafts and issued revisions whose content has an event linked to the record (jsonb
     * containment on events[].device.id), in the projects the scope may see.
     */
    async modelsLinkingTo(deviceId: string, scope: UsageScope): Promise<LinkingModel[]> {
      const linksTo = (content: SQL) => sql`${content} @> ${JSON.stringify({ events: [{ device: { id: deviceId } }] })}::jsonb`;
      const visible =
        scope === 'every-project'
          ? undefined
          : exists(
              db
                .select({ one: sql`1` })
                .from(projectMembers)
                .where(and(eq(projectMembers.projectId, models.projectId), eq(projectMembers.userId, scope.memberId))),
            );
      const where = {
        projectId: models.projectId,
        projectName: projects.name,
        projectArchived: projects.archived,
        sifId: models.sifId,
        sifTag: sifs.tag,
        modelId: models.id,
        modelName: models.name,
      };
      const drafts = await db
        .select({ ...where, placeNumber: models.draftVersion, content: models.draftContent })
        .from(models)
        .innerJoin(projects, eq(projects.id, models.projectId))
        .innerJoin(sifs, eq(sifs.id, models.sifId))
        .where(and(linksTo(sql`${models.draftContent}`), visible));
      const revisions = await db
        .select({ ...where, placeNumber: modelRevisions.number, content: modelRevisions.content })
        .from(modelRevisions)
        .innerJoin(models, eq(models.id, modelRevisions.modelId))
        .innerJoin(projects, eq(projects.id, models.projectId))
        .innerJoin(sifs, eq(sifs.id, models.sifId))
        .where(and(linksTo(sql`${modelRevisions.content}`), visible));
      return [...drafts.map((row) => ({ ...row, place: 'draft' as const })), ...revisions.map((row) => ({ ...row, place: 'revision' as const }))];
    },

    async findVersion(deviceId: string, version: number): Promise<DeviceVersion | undefined> {
      const [row] = await db
        .select({ version: deviceVersions, authorName: users.displayName })
        .from(deviceVersions)
        .innerJoin(users, eq(users.id, deviceVersions.createdById))
        .where(and(eq(deviceVersions.deviceId, deviceId), eq(deviceVersions.version, version)));
      return row ? toVersion(row.version, row.authorName) : undefined;
    },

    async listVersions(deviceId: string): Promise<DeviceVersion[]> {
      const rows = await db
        .select({ version: deviceVersions, authorName: users.displayName })
        .from(deviceVersions)
        .innerJoin(users, eq(users.id, deviceVersions.createdById))
        .where(eq(deviceVersions.deviceId, deviceId))
        .orderBy(desc(deviceVersions.version));
      return rows.map((row) => toVersion(row.version, row.authorName));
    },

    /** The record with this maker and model (case-insensitive), if any. */
    async findByIdentity(maker: string, model: string): Promise<{ id: string; currentVersion: number } | undefined> {
      const [row] = await db
        .select({ id: devices.id, currentVersion: devices.currentVersion })
        .from(devices)
        .where(and(sql`lower(${devices.maker}) = lower(${maker})`, sql`lower(${devices.model}) = lower(${model})`));
      return row;
    },

    /** Inserts a record with its version 1; returns the id. */
    async insertDevice(write: VersionToWrite): Promise<string> {
      const [created] = await db
        .insert(devices)
        .values({ maker: write.fields.maker, model: write.fields.model, createdById: write.userId })
        .returning({ id: devices.id });
      await db.insert(deviceVersions).values({ ...write.fields, deviceId: created!.id, version: 1, changeNote: write.changeNote, createdById: write.userId });
      return created!.id;
    },

    /** Writes version `version` of a record and makes it current (the caller locked the record). */
    async insertVersion(deviceId: string, version: number, write: VersionToWrite): Promise<void> {
      await db.insert(deviceVersions).values({ ...write.fields, deviceId, version, changeNote: write.changeNote, createdById: write.userId });
      await db
        .update(devices)
        .set({ currentVersion: version, maker: write.fields.maker, model: write.fields.model })
        .where(eq(devices.id, deviceId));
    },

    async listEvidence(deviceId: string): Promise<DeviceEvidence[]> {
      const rows = await db
        .select({ evidence: evidenceColumns, uploaderName: users.displayName })
        .from(deviceEvidence)
        .innerJoin(users, eq(users.id, deviceEvidence.uploadedById))
        .where(eq(deviceEvidence.deviceId, deviceId))
        .orderBy(asc(deviceEvidence.uploadedAt));
      return rows.map((row) => toEvidence(row.evidence, row.uploaderName));
    },

    async insertEvidence(values: Omit<DeviceEvidenceRow, 'id' | 'uploadedAt'>): Promise<string> {
      const [row] = await db.insert(deviceEvidence).values(values).returning({ id: deviceEvidence.id });
      return row!.id;
    },

    async findEvidenceFile(deviceId: string, evidenceId: string): Promise<Pick<DeviceEvidenceRow, 'fileName' | 'contentType' | 'content' | 'byteSize'> | undefined> {
      const [row] = await db
        .select({ fileName: deviceEvidence.fileName, contentType: deviceEvidence.contentType, content: deviceEvidence.content, byteSize: deviceEvidence.byteSize })
        .from(deviceEvidence)
        .where(and(eq(deviceEvidence.deviceId, deviceId), eq(deviceEvidence.id, evidenceId)));
      return row;
    },

    async deleteEvidence(deviceId: string, evidenceId: string): Promise<boolean> {
      const removed = await db
        .delete(deviceEvidence)
        .where(and(eq(deviceEvidence.deviceId, deviceId), eq(deviceEvidence.id, evidenceId)))
        .returning({ id: deviceEvidence.id });
      return removed.length > 0;
    },
  };
}

export type DeviceRepository = ReturnType<typeof deviceRepository>;
