import { aliasedTable, and, desc, eq } from 'drizzle-orm';
import type { ModelDetail, ModelDraft, ModelRevision, ModelRevisionDetail, ModelSummary } from '../../shared/api/models.js';
import type { Database } from '../db/client.js';
import { modelRevisions, models, type ModelRevisionRow, type ModelRow } from '../db/schema/models.js';
import { users } from '../db/schema/users.js';

/** Queries of models and revisions, each scoped to one project (the caller checked access to it). */
export function modelRepository(db: Database, projectId: string) {
  const draftAuthor = aliasedTable(users, 'draft_author');
  const issuer = aliasedTable(users, 'issuer');

  const toSummary = (row: ModelRow): ModelSummary => ({
    id: row.id,
    projectId: row.projectId,
    sifId: row.sifId,
    name: row.name,
    kind: row.kind,
    draftVersion: row.draftVersion,
    latestRevision: row.latestRevision,
    createdAt: row.createdAt.toISOString(),
    createdById: row.createdById,
    updatedAt: row.updatedAt.toISOString(),
  });

  const toDraft = (row: ModelRow, authorName: string): ModelDraft => ({
    version: row.draftVersion,
    content: row.draftContent,
    issues: row.draftIssues,
    updatedAt: row.draftUpdatedAt.toISOString(),
    updatedById: row.draftUpdatedById,
    updatedByDisplayName: authorName,
  });

  const toRevision = (row: ModelRevisionRow, issuerName: string): ModelRevision => ({
    id: row.id,
    modelId: row.modelId,
    number: row.number,
    contentHash: row.contentHash,
    reason: row.reason,
    issuedAt: row.issuedAt.toISOString(),
    issuedById: row.issuedById,
    issuedByDisplayName: issuerName,
  });

  return {
    toSummary,

    async listBySif(sifId: string): Promise<ModelSummary[]> {
      const rows = await db
        .select()
        .from(models)
        .where(and(eq(models.projectId, projectId), eq(models.sifId, sifId)))
        .orderBy(models.createdAt);
      return rows.map(toSummary);
    },

    async findRow(modelId: string): Promise<ModelRow | undefined> {
      const [row] = await db.select().from(models).where(and(eq(models.projectId, projectId), eq(models.id, modelId)));
      return row;
    },

    async findDetail(modelId: string): Promise<ModelDetail | undefined> {
      const [found] = await db
        .select({ model: models, authorName: draftAuthor.displayName })
        .from(models)
        .innerJoin(draftAuthor, eq(draftAuthor.id, models.draftUpdatedById))
        .where(and(eq(models.projectId, projectId), eq(models.id, modelId)));
      return found && { ...toSummary(found.model), draft: toDraft(found.model, found.authorName) };
    },

    async insert(values: Omit<typeof models.$inferInsert, 'projectId'>): Promise<ModelRow> {
      const [row] = await db.insert(models).values({ ...values, projectId }).returning();
      return row!;
    },

    /** Saves the draft when `basedOn` is still the stored version; undefined when it is stale. */
    async saveDraft(modelId: string, basedOn: number, changes: Pick<ModelRow, 'draftContent' | 'draftIssues' | 'name' | 'draftUpdatedById'>): Promise<ModelRow | undefined> {
      const [row] = await db
        .update(models)
        .set({ ...changes, draftVersion: basedOn + 1, draftUpdatedAt: new Date() })
        .where(and(eq(models.projectId, projectId), eq(models.id, modelId), eq(models.draftVersion, basedOn)))
        .returning();
      return row;
    },

    async listRevisions(modelId: string): Promise<ModelRevision[]> {
      const rows = await db
        .select({ revision: modelRevisions, issuerName: issuer.displayName })
        .from(modelRevisions)
        .innerJoin(models, eq(models.id, modelRevisions.modelId))
        .innerJoin(issuer, eq(issuer.id, modelRevisions.issuedById))
        .where(and(eq(models.projectId, projectId), eq(modelRevisions.modelId, modelId)))
        .orderBy(desc(modelRevisions.number));
      return rows.map((row) => toRevision(row.revision, row.issuerName));
    },

    async findRevision(modelId: string, number: number): Promise<ModelRevisionDetail | undefined> {
      const [row] = await db
        .select({ revision: modelRevisions, issuerName: issuer.displayName })
        .from(modelRevisions)
        .innerJoin(models, eq(models.id, modelRevisions.modelId))
        .innerJoin(issuer, eq(issuer.id, modelRevisions.issuedById))
        .where(and(eq(models.projectId, projectId), eq(modelRevisions.modelId, modelId), eq(modelRevisions.number, number)));
      return row && { ...toRevision(row.revision, row.issuerName), content: row.revision.content };
    },

    async findRevisionRow(modelId: string, number: number): Promise<ModelRevisionRow | undefined> {
      const [row] = await db
        .select({ revision: modelRevisions })
        .from(modelRevisions)
        .innerJoin(models, eq(models.id, modelRevisions.modelId))
        .where(and(eq(models.projectId, projectId), eq(modelRevisions.modelId, modelId), eq(modelRevisions.number, number)));
      return row?.revision;
    },

    /**
     * Issues the draft as the next revision when the draft is still at `draftVersion`, in one transaction
     * that locks the model row, so two issues at once get consecutive numbers.
     */
    async issueRevision(
      modelId: string,
      draftVersion: number,
      revision: (model: ModelRow) => Pick<ModelRevisionRow, 'content' | 'contentHash' | 'reason' | 'issuedById'>,
    ): Promise<{ kind: 'issued'; number: number } | { kind: 'stale' } | { kind: 'missing' }> {
      return db.transaction(async (tx) => {
        const [model] = await tx
          .select()
          .from(models)
          .where(and(eq(models.projectId, projectId), eq(models.id, modelId)))
          .for('update');
        if (!model) return { kind: 'missing' };
        if (model.draftVersion !== draftVersion) return { kind: 'stale' };
        const number = (model.latestRevision ?? 0) + 1;
        await tx.insert(modelRevisions).values({ ...revision(model), modelId, number });
        await tx.update(models).set({ latestRevision: number }).where(eq(models.id, modelId));
        return { kind: 'issued', number };
      });
    },
  };
}

export type ModelRepository = ReturnType<typeof modelRepository>;
