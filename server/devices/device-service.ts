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
import { deviceRepository, type DeviceRepository } from './device-repository.js';
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

  function buildPreview(body: ParsedPreview, existing: Map<string, { id: string; version: number; fields: DeviceFields }>): ImportPreview {
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
      const outcome: ImportRowOutcome = sameFigures(match.fields, row.fields) ? 'unchanged' : 'new-version';
      return { ...base, outcome, existing: { id: match.id, version: match.version } };
    });
    const counts = Object.fromEntries(IMPORT_ROW_OUTCOMES.map((outcome) => [outcome, rows.filter((row) => row.outcome === outcome).length])) as Record<
      ImportRowOutcome,
      number
    >;
    return { headers: parsed.headers, mapping: parsed.mapping, rateUnit: body.rateUnit, rows, fileErrors: parsed.fileErrors, counts };
  }

  async function existingByIdentity(repo: DeviceRepository) {
    const all = await repo.list({});
    return new Map(all.map((item) => [identityKey(item), { id: item.id, version: item.version, fields: item }]));
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
      return repository.list({ search: query.search, category: query.category, ids: query.ids });
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
          const current = await repo.currentVersionNumber(deviceId, true);
          if (current === undefined) throw apiErrors.notFound('no device record with this id');
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

    async exportCsv(user: SessionUser): Promise<string> {
      await requireReader(user);
      return devicesToCsv(await repository.list({}));
    },

    /** Checked before the file is received, so a refused upload is not read into memory first. */
    async checkEvidenceUpload(user: SessionUser, deviceId: string): Promise<void> {
      await requireEditor(user, 'attach evidence to device records');
      await requireDevice(deviceId);
    },

    async addEvidence(user: SessionUser, deviceId: string, upload: EvidenceUpload) {
      await requireEditor(user, 'attach evidence to device records');
      const current = await requireDevice(deviceId);
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
      if (!(await repository.deleteEvidence(deviceId, evidenceId))) throw apiErrors.notFound('no evidence file with this id on this record');
    },
  };
}

function identityKey(fields: Pick<DeviceFields, 'maker' | 'model'>): string {
  return `${fields.maker.toLowerCase()}\u0000${fields.model.toLowerCase()}`;
}
