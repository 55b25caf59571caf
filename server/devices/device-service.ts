import { createHash } from 'node:crypto';
import type { z } from 'zod';
import {
  canEditDevices,
  type createDeviceBody,
  type importConfirmBody,
  type importPreviewBody,
  type updateDeviceBody,
  IMPORT_ROW_OUTCOMES,
  type DeviceDetail,
  type DeviceLibraryAccess,
  type DeviceFields,
  type deviceListQuery,
  type DeviceSummary,
  type DeviceUsage,
  type DeviceUsageEntry,
  type DeviceVersion,
  type ImportPreview,
  type ImportPreviewRow,
  type ImportResult,
  type ImportRowOutcome,
} from '../../shared/api/devices.js';
import type { ValidationIssue } from '../../shared/api/errors.js';
import type { SessionUser } from '../auth/session-user.js';
import { uniqueViolation, type Database } from '../db/client.js';
import { apiErrors } from '../errors.js';
import { devicesToCsv, parseDeviceCsv, sameFigures } from './device-csv.js';
import { deviceRepository, type DeviceRepository, type LinkingModel } from './device-repository.js';
import { detectEvidenceType } from './evidence-type.js';

type ParsedCreate = z.output<typeof createDeviceBody>;
type ParsedUpdate = z.output<typeof updateDeviceBody>;
type ParsedPreview = z.output<typeof importPreviewBody>;
type ParsedConfirm = z.output<typeof importConfirmBody>;

export interface EvidenceUpload {
  readonly originalName: string;
  readonly declaredType: string;
  readonly bytes: Buffer;
  readonly description: string;
}

function splitBody<Body extends { changeNote: string }>(body: Body): { fields: DeviceFields; changeNote: string } {
  const { changeNote, ...rest } = body;
  const fields = { ...rest } as Record<string, unknown>;
  delete fields['basedOnVersion'];
  return { fields: fields as DeviceFields, changeNote };
}

/** A file name safe to send back in Content-Disposition and to show: no path, no control characters. */
function cleanFileName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? '';
  const cleaned = base.replace(/[\u0000-\u001f\u007f"]/g, '').trim().slice(0, 200);
  return cleaned === '' ? 'evidence' : cleaned;
}

/** The rules of the device library (who may read and edit, versioning, import, evidence). */
export function createDeviceService(db: Database) {
  const repository = deviceRepository(db);

  /** 404 for a user who is neither an admin nor a member of any project, as for a project they may not see. */
  async function requireReader(user: SessionUser): Promise<void> {
    if (user.isAdmin) return;
    if (!(await repository.isMemberAnywhere(user.id))) throw apiErrors.notFound('the device library is open to project members only');
  }

  async function requireEditor(user: SessionUser, doing: string): Promise<void> {
    await requireReader(user);
    if (!canEditDevices(await repository.activeRolesOf(user.id), user.isAdmin)) {
      throw apiErrors.forbidden(`only leads and engineers of an active project (or site admins) may ${doing}`);
    }
  }

  async function detail(repo: DeviceRepository, deviceId: string): Promise<DeviceDetail> {
    const [current] = await repo.list({ ids: [deviceId] });
    if (!current) throw apiErrors.notFound('no device record with this id');
    return { ...current, evidence: await repo.listEvidence(deviceId) };
  }

  async function requireDevice(deviceId: string): Promise<number> {
    const current = await repository.currentVersionNumber(deviceId);
    if (current === undefined) throw apiErrors.notFound('no device record with this id');
    return current;
  }

  function archivedRefuses(doing: string) {
    return apiErrors.conflict(`this library record is archived; restore it before you ${doing}`);
  }

  /** The current version of a record that is not archived (404 unknown, 409 archived). */
  async function requireActiveDevice(repo: DeviceRepository, deviceId: string, doing: string, forUpdate = false): Promise<number> {
    const state = await repo.state(deviceId, forUpdate);
    if (!state) throw apiErrors.notFound('no device record with this id');
    if (state.archived) throw archivedRefuses(doing);
    return state.currentVersion;
  }

  function identityTaken(fields: DeviceFields) {
    return apiErrors.alreadyExists('model', `the library already has "${fields.maker} ${fields.model}"; edit that record to add a version`);
  }

  /** Two saves of the same maker and model at once: the unique index refuses the second, reported as a 409. */
  async function withIdentityCheck<Result>(fields: DeviceFields, save: () => Promise<Result>): Promise<Result> {
    try {
      return await save();
    } catch (error) {
      if (uniqueViolation(error) === 'devices_maker_model_unique') throw identityTaken(fields);
      throw error;
    }
  }

  function buildPreview(body: ParsedPreview, existing: Map<string, { id: string; version: number; fields: DeviceFields; archived: boolean }>): ImportPreview {
    const parsed = parseDeviceCsv(body.csv, body.mapping, body.rateUnit);
    const firstLineOf = new Map<string, number>();
    const rows: ImportPreviewRow[] = parsed.rows.map((row) => {
      const base = { line: row.line, cells: row.cells, fields: row.fields, errors: row.errors, existing: null, duplicateOfLine: null };
      if (!row.fields) return { ...base, outcome: 'invalid' as const };
      const key = identityKey(row.fields);
      const first = firstLineOf.get(key);
      if (first !== undefined) return { ...base, outcome: 'duplicate-in-file' as const, duplicateOfLine: first };
      firstLineOf.set(key, row.line);
      const match = existing.get(key);
      if (!match) return { ...base, outcome: 'new' as const };
      const same = sameFigures(match.fields, row.fields);
      const found = { id: match.id, version: match.version };
      if (match.archived && !same) {
        const message = `"${row.fields.maker} ${row.fields.model}" is archived in the library; restore it before importing a new version`;
        return { ...base, outcome: 'invalid' as const, existing: found, errors: [...row.errors, { path: 'model', message }] };
      }
      return { ...base, outcome: same ? ('unchanged' as const) : ('new-version' as const), existing: found };
    });
    const counts = Object.fromEntries(IMPORT_ROW_OUTCOMES.map((outcome) => [outcome, rows.filter((row) => row.outcome === outcome).length])) as Record<
      ImportRowOutcome,
      number
    >;
    return { headers: parsed.headers, mapping: parsed.mapping, rateUnit: body.rateUnit, rows, fileErrors: parsed.fileErrors, counts };
  }

  async function existingByIdentity(repo: DeviceRepository) {
    const all = await repo.list({ archived: 'all' });
    return new Map(all.map((item) => [identityKey(item), { id: item.id, version: item.version, fields: item, archived: item.archivedAt !== null }]));
  }

  /** The writes of a confirmed import, in one transaction (the preview is computed again inside it). */
  async function importRows(user: SessionUser, body: ParsedConfirm): Promise<ImportResult> {
    return db.transaction(async (tx) => {
      const repo = deviceRepository(tx);
      const preview = buildPreview(body, await existingByIdentity(repo));
      if (preview.fileErrors.length > 0) {
        throw apiErrors.validation(preview.fileErrors.map((message) => ({ path: 'csv', message })));
      }
      const invalid = preview.rows.filter((row) => row.outcome === 'invalid');
      if (invalid.length > 0 && !body.skipInvalidRows) {
        const issues: ValidationIssue[] = invalid.flatMap((row) => row.errors.map((error) => ({ path: `line ${row.line}.${error.path}`, message: error.message })));
        throw apiErrors.validation(issues);
      }
      const result = { created: 0, newVersions: 0, skipped: 0 };
      const note = `CSV import by ${user.displayName}`;
      for (const row of preview.rows) {
        if (row.outcome === 'new' && row.fields) {
          await repo.insertDevice({ fields: row.fields, changeNote: note, userId: user.id });
          result.created += 1;
        } else if (row.outcome === 'new-version' && row.fields && row.existing && body.existingRecords === 'new-version') {
          const current = await repo.currentVersionNumber(row.existing.id, true);
          await repo.insertVersion(row.existing.id, (current ?? row.existing.version) + 1, { fields: row.fields, changeNote: note, userId: user.id });
          result.newVersions += 1;
        } else {
          result.skipped += 1;
        }
      }
      return result;
    });
  }

  return {
    async access(user: SessionUser): Promise<DeviceLibraryAccess> {
      const canRead = user.isAdmin || (await repository.isMemberAnywhere(user.id));
      return { canRead, canEdit: canRead && canEditDevices(await repository.activeRolesOf(user.id), user.isAdmin) };
    },

    async list(user: SessionUser, query: z.output<typeof deviceListQuery>): Promise<DeviceSummary[]> {
      await requireReader(user);
      // The records a model links to resolve even when archived; searches and pickers see active ones.
      const archived = query.archived ?? (query.ids ? 'all' : 'active');
      return repository.list({ search: query.search, category: query.category, ids: query.ids, archived });
    },

    async get(user: SessionUser, deviceId: string): Promise<DeviceDetail> {
      await requireReader(user);
      return detail(repository, deviceId);
    },

    async listVersions(user: SessionUser, deviceId: string): Promise<DeviceVersion[]> {
      await requireReader(user);
      await requireDevice(deviceId);
      return repository.listVersions(deviceId);
    },

    async getVersion(user: SessionUser, deviceId: string, version: number): Promise<DeviceVersion> {
      await requireReader(user);
      const found = await repository.findVersion(deviceId, version);
      if (!found) throw apiErrors.notFound(`no version ${version} of this device record`);
      return found;
    },

    async create(user: SessionUser, body: ParsedCreate): Promise<DeviceDetail> {
      await requireEditor(user, 'add records to the device library');
      const { fields, changeNote } = splitBody(body);
      return withIdentityCheck(fields, () =>
        db.transaction(async (tx) => {
          const repo = deviceRepository(tx);
          if (await repo.findByIdentity(fields.maker, fields.model)) throw identityTaken(fields);
          const id = await repo.insertDevice({ fields, changeNote: changeNote || 'first version', userId: user.id });
          return detail(repo, id);
        }),
      );
    },

    async update(user: SessionUser, deviceId: string, body: ParsedUpdate): Promise<DeviceDetail> {
      await requireEditor(user, 'edit the device library');
      const { fields, changeNote } = splitBody(body);
      return withIdentityCheck(fields, () =>
        db.transaction(async (tx) => {
          const repo = deviceRepository(tx);
          const current = await requireActiveDevice(repo, deviceId, 'edit it', true);
          if (current !== body.basedOnVersion) {
            throw apiErrors.versionConflict(
              `this record is at version ${current}, not ${body.basedOnVersion}: someone saved a newer version; compare and edit again`,
              await detail(repo, deviceId),
            );
          }
          const sameName = await repo.findByIdentity(fields.maker, fields.model);
          if (sameName && sameName.id !== deviceId) throw identityTaken(fields);
          await repo.insertVersion(deviceId, current + 1, { fields, changeNote, userId: user.id });
          return detail(repo, deviceId);
        }),
      );
    },

    async previewImport(user: SessionUser, body: ParsedPreview): Promise<ImportPreview> {
      await requireEditor(user, 'import into the device library');
      return buildPreview(body, await existingByIdentity(repository));
    },

    async confirmImport(user: SessionUser, body: ParsedConfirm): Promise<ImportResult> {
      await requireEditor(user, 'import into the device library');
      try {
        return await importRows(user, body);
      } catch (error) {
        if (uniqueViolation(error) === 'devices_maker_model_unique') {
          throw apiErrors.conflict('a record of this file was added by someone else meanwhile; nothing was imported, preview the file again');
        }
        throw error;
      }
    },

    /** The active records (archived ones are left out, as in the list). */
    async exportCsv(user: SessionUser): Promise<string> {
      await requireReader(user);
      return devicesToCsv(await repository.list({ archived: 'active' }));
    },

    async archive(user: SessionUser, deviceId: string): Promise<DeviceDetail> {
      await requireEditor(user, 'archive device records');
      await requireDevice(deviceId);
      await repository.setArchived(deviceId, user.id);
      return detail(repository, deviceId);
    },

    async restore(user: SessionUser, deviceId: string): Promise<DeviceDetail> {
      await requireEditor(user, 'restore device records');
      await requireDevice(deviceId);
      await repository.setArchived(deviceId, null);
      return detail(repository, deviceId);
    },

    /** Deletes a record no model links to; while any draft or revision in any project does, 409 (archive instead). */
    async remove(user: SessionUser, deviceId: string): Promise<void> {
      await requireEditor(user, 'delete device records');
      await db.transaction(async (tx) => {
        const repo = deviceRepository(tx);
        if (!(await repo.state(deviceId, true))) throw apiErrors.notFound('no device record with this id');
        const linking = await repo.modelsLinkingTo(deviceId, 'every-project');
        if (linking.length > 0) {
          const seen = user.isAdmin ? linking : await visibleTo(repo, user, linking);
          const named = [...new Set(seen.map((model) => `"${model.modelName}" of ${model.sifTag}`))];
          const places = [...named.slice(0, 5), ...(named.length > 5 ? [`${named.length - 5} more`] : []), ...(seen.length < linking.length ? ['models in projects you are not a member of'] : [])];
          throw apiErrors.conflict(
            `this record cannot be deleted while models link to it (drafts or issued revisions): ${places.join(', ')}; archive it instead, which hides it from the pickers and keeps those links`,
          );
        }
        await repo.deleteDevice(deviceId);
      });
    },

    async usage(user: SessionUser, deviceId: string): Promise<DeviceUsage> {
      await requireReader(user);
      const currentVersion = await requireDevice(deviceId);
      const linking = await repository.modelsLinkingTo(deviceId, user.isAdmin ? 'every-project' : { memberId: user.id });
      const entries = linking.flatMap((model) => usageEntries(model, deviceId));
      entries.sort(
        (a, b) =>
          a.projectName.localeCompare(b.projectName) ||
          a.sifTag.localeCompare(b.sifTag) ||
          a.modelName.localeCompare(b.modelName) ||
          a.place.localeCompare(b.place) ||
          b.placeNumber - a.placeNumber ||
          a.eventId.localeCompare(b.eventId),
      );
      return { deviceId, currentVersion, entries };
    },

    /** Checked before the file is received, so a refused upload is not read into memory first. */
    async checkEvidenceUpload(user: SessionUser, deviceId: string): Promise<void> {
      await requireEditor(user, 'attach evidence to device records');
      await requireActiveDevice(repository, deviceId, 'attach evidence to it');
    },

    async addEvidence(user: SessionUser, deviceId: string, upload: EvidenceUpload) {
      await requireEditor(user, 'attach evidence to device records');
      const current = await requireActiveDevice(repository, deviceId, 'attach evidence to it');
      const detected = detectEvidenceType(upload.bytes);
      if (!detected) {
        throw apiErrors.invalidField('file', 'must be a PDF, PNG or JPEG file (its content is none of these)');
      }
      if (upload.declaredType !== detected && !(upload.declaredType === 'image/jpg' && detected === 'image/jpeg')) {
        throw apiErrors.invalidField('file', `is declared as ${upload.declaredType || 'no type'} but its content is ${detected}`);
      }
      await repository.insertEvidence({
        deviceId,
        deviceVersion: current,
        fileName: cleanFileName(upload.originalName),
        contentType: detected,
        byteSize: upload.bytes.length,
        sha256: createHash('sha256').update(upload.bytes).digest('hex'),
        description: upload.description,
        content: upload.bytes,
        uploadedById: user.id,
      });
      return detail(repository, deviceId);
    },

    async evidenceFile(user: SessionUser, deviceId: string, evidenceId: string) {
      await requireReader(user);
      const file = await repository.findEvidenceFile(deviceId, evidenceId);
      if (!file) throw apiErrors.notFound('no evidence file with this id on this record');
      return file;
    },

    async removeEvidence(user: SessionUser, deviceId: string, evidenceId: string): Promise<void> {
      await requireEditor(user, 'remove evidence from device records');
      await requireActiveDevice(repository, deviceId, 'remove evidence from it');
      if (!(await repository.deleteEvidence(deviceId, evidenceId))) throw apiErrors.notFound('no evidence file with this id on this record');
    },
  };
}

/** The models of the list in projects the user is a member of. */
async function visibleTo(repo: DeviceRepository, user: SessionUser, linking: readonly LinkingModel[]): Promise<LinkingModel[]> {
  const mine = new Set(await repo.projectIdsOf(user.id));
  return linking.filter((model) => mine.has(model.projectId));
}

/** The events of a model's content that link to the record (the content may be an unfinished draft). */
function usageEntries(model: LinkingModel, deviceId: string): DeviceUsageEntry[] {
  const events = Array.isArray(model.content['events']) ? (model.content['events'] as unknown[]) : [];
  return events.flatMap((event): DeviceUsageEntry[] => {
    if (typeof event !== 'object' || event === null) return [];
    const { id, label, device } = event as { id?: unknown; label?: unknown; device?: unknown };
    if (typeof device !== 'object' || device === null) return [];
    const link = device as { id?: unknown; version?: unknown; overrides?: unknown };
    if (link.id !== deviceId || typeof link.version !== 'number' || !Number.isInteger(link.version) || link.version < 1) return [];
    const overrides = Array.isArray(link.overrides) ? link.overrides : [];
    return [
      {
        projectId: model.projectId,
        projectName: model.projectName,
        projectArchived: model.projectArchived,
        sifId: model.sifId,
        sifTag: model.sifTag,
        modelId: model.modelId,
        modelName: model.modelName,
        place: model.place,
        placeNumber: model.placeNumber,
        eventId: typeof id === 'string' ? id : '(no id)',
        eventLabel: typeof label === 'string' ? label : null,
        linkedVersion: link.version,
        overriddenFields: overrides.flatMap((item) => (typeof item === 'object' && item !== null && typeof (item as { field?: unknown }).field === 'string' ? [(item as { field: string }).field] : [])),
      },
    ];
  });
}

function identityKey(fields: Pick<DeviceFields, 'maker' | 'model'>): string {
  return `${fields.maker.toLowerCase()}\u0000${fields.model.toLowerCase()}`;
}
