import { and, eq } from 'drizzle-orm';
import type {
  CreateModelBody,
  DraftContent,
  ImportModelBody,
  IssueRevisionBody,
  ModelDetail,
  ModelDraft,
  ModelList,
  ModelRevisionDetail,
  ModelRevisionList,
  SaveDraftBody,
} from '../../shared/api/models.js';
import type { ModelFile } from '../../shared/model-file.js';
import type { SessionUser } from '../auth/session-user.js';
import type { Database } from '../db/client.js';
import type { ModelRow } from '../db/schema/models.js';
import { sifs } from '../db/schema/sifs.js';
import { apiErrors } from '../errors.js';
import { modelContentHash } from '../solves/content-hash.js';
import { loadProjectAccess, type ProjectAccess } from '../projects/project-access.js';
import { revisionIssued } from '../reviews/revision-issued.js';
import { requireModelEditor } from './model-access.js';
import { checkModelFile, requireModelFile } from './model-file-check.js';
import { modelRepository, type ModelRepository } from './model-repository.js';

export interface ModelFileDownload {
  readonly fileName: string;
  readonly file: ModelFile;
}

function fileNameOf(name: string, revision: number | null): string {
  const slug = name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'model';
  return `${slug}${revision === null ? '-draft' : `-rev-${revision}`}.json`;
}

/** The draft's name for the model list: the file's `name` when it has one, else the name it had. */
function draftName(content: DraftContent, previous: string): string {
  const name = content['name'];
  return typeof name === 'string' && name.trim() !== '' ? name.trim().slice(0, 200) : previous;
}

/** Rules of models, drafts and revisions (roles: shared/api/models.ts). */
export function createModelService(db: Database) {
  async function open(user: SessionUser, projectId: string): Promise<{ access: ProjectAccess; repository: ModelRepository }> {
    const access = await loadProjectAccess(db, user, projectId);
    return { access, repository: modelRepository(db, projectId) };
  }

  async function requireSif(projectId: string, sifId: string, forChange: boolean) {
    const [sif] = await db
      .select({ id: sifs.id, tag: sifs.tag, archived: sifs.archived })
      .from(sifs)
      .where(and(eq(sifs.projectId, projectId), eq(sifs.id, sifId)));
    if (!sif) throw apiErrors.notFound('no such SIF in this project');
    if (forChange && sif.archived) throw apiErrors.conflict(`SIF ${sif.tag} is archived; restore it before changing its models`);
    return sif;
  }

  async function requireModel(repository: ModelRepository, modelId: string): Promise<ModelRow> {
    const row = await repository.findRow(modelId);
    if (!row) throw apiErrors.notFound('no such model in this project');
    return row;
  }

  async function requireDetail(repository: ModelRepository, modelId: string): Promise<ModelDetail> {
    const detail = await repository.findDetail(modelId);
    if (!detail) throw apiErrors.notFound('no such model in this project');
    return detail;
  }

  async function staleDraft(repository: ModelRepository, modelId: string, sentVersion: number): Promise<never> {
    const current = await requireDetail(repository, modelId);
    throw apiErrors.versionConflict(
      `the draft was saved by ${current.draft.updatedByDisplayName} since version ${sentVersion}; it is now at version ${current.draft.version} (details.current holds it, your changes were not saved)`,
      current.draft,
    );
  }

  async function writeDraft(user: SessionUser, projectId: string, modelId: string, version: number, content: DraftContent, strict: boolean): Promise<ModelDraft> {
    const { access, repository } = await open(user, projectId);
    requireModelEditor(access, 'save a model draft');
    const model = await requireModel(repository, modelId);
    await requireSif(projectId, model.sifId, true);
    if (strict) requireModelFile(content, 'file', model.kind);
    const { issues } = checkModelFile(content, model.kind);
    const saved = await repository.saveDraft(modelId, version, {
      draftContent: content,
      draftIssues: issues,
      name: draftName(content, model.name),
      draftUpdatedById: user.id,
    });
    if (!saved) return staleDraft(repository, modelId, version);
    return (await requireDetail(repository, modelId)).draft;
  }

  return {
    async list(user: SessionUser, projectId: string, sifId: string): Promise<ModelList> {
      const { repository } = await open(user, projectId);
      await requireSif(projectId, sifId, false);
      return repository.listBySif(sifId);
    },

    /** Creates a model from a valid model file (new or imported); the file's kind is the model's kind. */
    async create(user: SessionUser, projectId: string, sifId: string, body: CreateModelBody): Promise<ModelDetail> {
      const { access, repository } = await open(user, projectId);
      requireModelEditor(access, 'create a model');
      await requireSif(projectId, sifId, true);
      const file = requireModelFile(body.file, 'file');
      const row = await repository.insert({
        sifId,
        name: file.name,
        kind: file.kind,
        draftContent: file as DraftContent,
        draftIssues: [],
        draftUpdatedById: user.id,
        createdById: user.id,
      });
      return requireDetail(repository, row.id);
    },

    async get(user: SessionUser, projectId: string, modelId: string): Promise<ModelDetail> {
      const { repository } = await open(user, projectId);
      return requireDetail(repository, modelId);
    },

    /** Autosave: any JSON object is kept, with its issues; a stale version is a 409 carrying the stored draft. */
    saveDraft(user: SessionUser, projectId: string, modelId: string, body: SaveDraftBody): Promise<ModelDraft> {
      return writeDraft(user, projectId, modelId, body.version, body.content, false);
    },

    /** Replaces the draft with a model file, which must be valid and of the model's kind. */
    importFile(user: SessionUser, projectId: string, modelId: string, body: ImportModelBody): Promise<ModelDraft> {
      const content = body.file;
      if (content === null || typeof content !== 'object' || Array.isArray(content)) {
        throw apiErrors.invalidField('file', 'must be the model file (a JSON object)');
      }
      return writeDraft(user, projectId, modelId, body.version, content as DraftContent, true);
    },

    async issueRevision(user: SessionUser, projectId: string, modelId: string, body: IssueRevisionBody): Promise<ModelRevisionDetail> {
      const { access, repository } = await open(user, projectId);
      requireModelEditor(access, 'issue a revision');
      const model = await requireModel(repository, modelId);
      await requireSif(projectId, model.sifId, true);
      if (model.draftVersion !== body.draftVersion) return staleDraft(repository, modelId, body.draftVersion);
      const file = requireModelFile(model.draftContent, 'draft', model.kind);
      const outcome = await repository.issueRevision(modelId, body.draftVersion, () => ({
        content: file as DraftContent,
        contentHash: modelContentHash(file),
        reason: body.reason,
        issuedById: user.id,
      }));
      if (outcome.kind === 'missing') throw apiErrors.notFound('no such model in this project');
      if (outcome.kind === 'stale') return staleDraft(repository, modelId, body.draftVersion);
      const revision = await repository.findRevision(modelId, outcome.number);
      if (!revision) throw apiErrors.notFound('no such revision');
      await revisionIssued(db, user, { projectId, sifId: model.sifId, modelId, modelName: model.name, number: revision.number, reason: body.reason });
      return revision;
    },

    async listRevisions(user: SessionUser, projectId: string, modelId: string): Promise<ModelRevisionList> {
      const { repository } = await open(user, projectId);
      await requireModel(repository, modelId);
      return repository.listRevisions(modelId);
    },

    async getRevision(user: SessionUser, projectId: string, modelId: string, number: number): Promise<ModelRevisionDetail> {
      const { repository } = await open(user, projectId);
      await requireModel(repository, modelId);
      const revision = await repository.findRevision(modelId, number);
      if (!revision) throw apiErrors.notFound(`the model has no revision ${number}`);
      return revision;
    },

    /** The draft (which must be valid) or an issued revision as a model file to download. */
    async exportFile(user: SessionUser, projectId: string, modelId: string, revision: number | undefined): Promise<ModelFileDownload> {
      const { repository } = await open(user, projectId);
      const model = await requireModel(repository, modelId);
      if (revision === undefined) {
        return { fileName: fileNameOf(model.name, null), file: requireModelFile(model.draftContent, 'draft', model.kind) };
      }
      const row = await repository.findRevisionRow(modelId, revision);
      if (!row) throw apiErrors.notFound(`the model has no revision ${revision}`);
      return { fileName: fileNameOf(model.name, revision), file: requireModelFile(row.content, 'revision') };
    },
  };
}

export type ModelService = ReturnType<typeof createModelService>;
