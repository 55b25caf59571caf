import { z } from 'zod';
import { multiLine, recordId, timestamp } from './common.js';
import { validationIssue } from './errors.js';
import type { ProjectRole } from './projects.js';

/**
 * Models of a SIF. Each model has one working draft (autosaved, optimistic version) and immutable issued
 * revisions (Rev 1, Rev 2, ...). The draft may be unfinished: any JSON object is stored, with the issues
 * the model file schema (shared/model-file.ts) finds in it, so that nothing typed is lost. Issuing a
 * revision, importing a file and solving need a model file without issues.
 * Roles: members of every role read models, drafts, revisions and exports; leads and engineers create
 * models, save drafts, import files and issue revisions.
 */
export const MODEL_KINDS = ['fault-tree', 'markov'] as const;
export const modelKind = z.enum(MODEL_KINDS, { message: 'must be fault-tree or markov' });
export type ModelKind = z.infer<typeof modelKind>;

/** A draft's content: any JSON object (the model file being edited). */
export const draftContent = z.record(z.string(), z.unknown(), { message: 'must be a JSON object (the model file)' });
export type DraftContent = z.infer<typeof draftContent>;

export const modelDraft = z.object({
  /** Optimistic version: 1 when the model is created, raised by every save. */
  version: z.number().int().min(1),
  content: draftContent,
  /** Problems of the content as a model file; paths as in the file, e.g. "events[2].lambdaDU". Empty when valid. */
  issues: z.array(validationIssue),
  updatedAt: timestamp,
  updatedById: recordId,
  updatedByDisplayName: z.string(),
});
export type ModelDraft = z.infer<typeof modelDraft>;

export const modelSummary = z.object({
  id: recordId,
  projectId: recordId,
  sifId: recordId,
  /** The draft's name (the model file's `name`), kept in step with every save. */
  name: z.string(),
  kind: modelKind,
  draftVersion: z.number().int().min(1),
  /** Number of the latest issued revision; null before the first. */
  latestRevision: z.number().int().min(1).nullable(),
  createdAt: timestamp,
  createdById: recordId,
  updatedAt: timestamp,
});
export type ModelSummary = z.infer<typeof modelSummary>;

export const modelList = z.array(modelSummary);
export type ModelList = z.infer<typeof modelList>;

export const modelDetail = modelSummary.extend({ draft: modelDraft });
export type ModelDetail = z.infer<typeof modelDetail>;

/**
 * POST /api/projects/:projectId/sifs/:sifId/models: creates a model from a model file (an import, or a
 * new blank model the client wrote). The file must be valid; its `kind` fixes the model's kind.
 */
export const createModelBody = z.strictObject({
  file: z.unknown().refine((value) => value !== undefined, 'must be the model file (a JSON object)'),
});
export type CreateModelBody = z.input<typeof createModelBody>;

/** PUT .../models/:modelId/draft: `version` is the draft version the edit is based on. */
export const saveDraftBody = z.strictObject({
  version: z.number({ message: 'must be the draft version you read' }).int('must be a whole number').min(1, 'must be 1 or more'),
  content: draftContent,
});
export type SaveDraftBody = z.input<typeof saveDraftBody>;

/** POST .../models/:modelId/import: replaces the draft with a model file, which must be valid. */
export const importModelBody = z.strictObject({
  version: saveDraftBody.shape.version,
  file: createModelBody.shape.file,
});
export type ImportModelBody = z.input<typeof importModelBody>;

/** details of the 409 version_conflict of a stale draft save, import or issue: the draft as stored now. */
export const draftConflictDetails = z.object({
  current: modelDraft,
});
export type DraftConflictDetails = z.infer<typeof draftConflictDetails>;

/** POST .../models/:modelId/revisions: issues the draft of `draftVersion` as the next revision. */
export const issueRevisionBody = z.strictObject({
  draftVersion: saveDraftBody.shape.version,
  reason: multiLine(2000, 1),
});
export type IssueRevisionBody = z.input<typeof issueRevisionBody>;

export const modelRevision = z.object({
  id: recordId,
  modelId: recordId,
  /** Rev 1, Rev 2, ... per model. */
  number: z.number().int().min(1),
  /** SHA-256 of the model file without its layout (what every number depends on). */
  contentHash: z.string(),
  reason: z.string(),
  issuedAt: timestamp,
  issuedById: recordId,
  issuedByDisplayName: z.string(),
});
export type ModelRevision = z.infer<typeof modelRevision>;

export const modelRevisionList = z.array(modelRevision);
export type ModelRevisionList = z.infer<typeof modelRevisionList>;

/** A revision with its model file (`content` passes `modelFile`). */
export const modelRevisionDetail = modelRevision.extend({ content: draftContent });
export type ModelRevisionDetail = z.infer<typeof modelRevisionDetail>;

/** GET .../models/:modelId/export: the draft (must be valid) or, with ?revision=N, that revision. */
export const exportModelQuery = z.object({
  revision: z.coerce.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more').optional(),
});
export type ExportModelQuery = z.input<typeof exportModelQuery>;

/** Roles that create models, save drafts, import files and issue revisions (and start or cancel solves). */
export const MODEL_EDIT_ROLES = ['lead', 'engineer'] as const;

/** Whether a project role (null: not a member, e.g. a site admin) may change models and start solves. */
export function canEditModels(role: ProjectRole | null): boolean {
  return role !== null && (MODEL_EDIT_ROLES as readonly ProjectRole[]).includes(role);
}
