import { aliasedTable, and, asc, eq, inArray, lte } from 'drizzle-orm';
import type { AnnotationList, AnnotationFilter, AnnotationTargetKind, CreateAnnotationBody, Annotation } from '../../shared/api/annotations.js';
import { ANNOTATOR_ROLES } from '../../shared/api/reviews.js';
import { fieldChanges, itemKey, modelItems, type ModelItem, type ModelItemKind } from '../../shared/model-diff.js';
import type { ModelFile } from '../../shared/model-file.js';
import type { SessionUser } from '../auth/session-user.js';
import { recordAudit } from '../audit/audit-trail.js';
import type { Database } from '../db/client.js';
import type { ModelRow } from '../db/schema/models.js';
import { annotationReplies, annotations, type AnnotationRow } from '../db/schema/reviews.js';
import { users } from '../db/schema/users.js';
import { apiErrors } from '../errors.js';
import type { Notice, Notifier } from '../mail/notifier.js';
import { requireModelFile } from '../models/model-file-check.js';
import { modelRepository } from '../models/model-repository.js';
import { loadProjectAccess, requireActiveProject, roleForbids, type ProjectAccess } from '../projects/project-access.js';

const ITEM_KINDS: Record<ModelFile['kind'], readonly AnnotationTargetKind[]> = {
  'fault-tree': ['gate', 'event', 'ccf'],
  markov: ['state', 'transition'],
};

/** The item's fields as a plain object, kept with the thread to tell later whether the item changed. */
const snapshotOf = (item: ModelItem) => Object.fromEntries(item.fields);

function itemFromSnapshot(kind: ModelItemKind, id: string, snapshot: unknown): ModelItem {
  return { kind, id, fields: new Map(Object.entries((snapshot ?? {}) as Record<string, unknown>)) };
}

/** Annotation threads on a model's revisions, carried forward revision to revision (roles: shared/api/index.ts). */
export function createAnnotationService(db: Database, notifier: Notifier) {
  const replier = aliasedTable(users, 'replier');

  async function annotator(user: SessionUser, projectId: string, doing: string): Promise<ProjectAccess> {
    const access = await loadProjectAccess(db, user, projectId);
    if (access.role === null || !ANNOTATOR_ROLES.includes(access.role)) throw roleForbids(access, doing);
    requireActiveProject(access);
    return access;
  }

  async function requireModel(projectId: string, modelId: string): Promise<ModelRow> {
    const model = await modelRepository(db, projectId).findRow(modelId);
    if (!model) throw apiErrors.notFound('no such model in this project');
    return model;
  }

  async function revisionFile(projectId: string, modelId: string, number: number, field: string): Promise<{ file: ModelFile; issuedById: string }> {
    const row = await modelRepository(db, projectId).findRevisionRow(modelId, number);
    if (!row) throw apiErrors.invalidField(field, `the model has no revision ${number}`);
    return { file: requireModelFile(row.content, 'revision'), issuedById: row.issuedById };
  }

  async function requireAnnotation(projectId: string, annotationId: string): Promise<AnnotationRow> {
    const [row] = await db.select().from(annotations).where(and(eq(annotations.projectId, projectId), eq(annotations.id, annotationId)));
    if (!row) throw apiErrors.notFound('no such annotation in this project');
    return row;
  }

  /** The model's latest revision, against which a single changed thread is shown. */
  async function latestFile(projectId: string, modelId: string): Promise<ModelFile | null> {
    const model = await requireModel(projectId, modelId);
    return model.latestRevision === null ? null : (await revisionFile(projectId, modelId, model.latestRevision, 'revision')).file;
  }

  async function toAnnotations(rows: readonly AnnotationRow[], shownOn: ModelFile | null): Promise<Annotation[]> {
    if (rows.length === 0) return [];
    const ids = rows.map((row) => row.id);
    const authorIds = [...new Set(rows.map((row) => row.authorId))];
    const [authors, replies] = await Promise.all([
      db.select({ id: users.id, displayName: users.displayName }).from(users).where(inArray(users.id, authorIds)),
      db
        .select({ reply: annotationReplies, authorName: replier.displayName })
        .from(annotationReplies)
        .innerJoin(replier, eq(replier.id, annotationReplies.authorId))
        .where(inArray(annotationReplies.annotationId, ids))
        .orderBy(asc(annotationReplies.createdAt)),
    ]);
    const nameOf = new Map(authors.map((author) => [author.id, author.displayName]));
    const items = shownOn ? modelItems(shownOn) : null;
    return rows.map((row) => {
      const pinnedToItem = row.itemId !== null && row.targetKind !== 'result';
      let outdated = false;
      if (pinnedToItem && items) {
        const now = items.get(itemKey(row.targetKind as ModelItemKind, row.itemId!));
        outdated = !now || fieldChanges(itemFromSnapshot(row.targetKind as ModelItemKind, row.itemId!, row.itemSnapshot), now).length > 0;
      }
      return {
        id: row.id,
        projectId: row.projectId,
        sifId: row.sifId,
        modelId: row.modelId,
        revision: row.revision,
        target: { kind: row.targetKind, itemId: row.itemId },
        severity: row.severity,
        status: row.status,
        body: row.body,
        authorId: row.authorId,
        authorDisplayName: nameOf.get(row.authorId) ?? '',
        createdAt: row.createdAt.toISOString(),
        resolvedById: row.resolvedById,
        resolvedAt: row.resolvedAt?.toISOString() ?? null,
        outdated,
        replies: replies
          .filter((reply) => reply.reply.annotationId === row.id)
          .map(({ reply, authorName }) => ({ id: reply.id, authorId: reply.authorId, authorDisplayName: authorName, body: reply.body, createdAt: reply.createdAt.toISOString() })),
      };
    });
  }

  /** "Comment on your model" notices: to the model's creator and the revision's issuer, not to the writer. */
  async function commentNotices(user: SessionUser, model: ModelRow, revision: number, text: string): Promise<Notice[]> {
    const row = await modelRepository(db, model.projectId).findRevisionRow(model.id, revision);
    const owners = new Set([model.createdById, row?.issuedById].filter((id): id is string => id !== undefined && id !== user.id));
    return [...owners].map((toUserId) => ({
      kind: 'comment' as const,
      toUserId,
      subject: `[Proofline] ${user.displayName} commented on ${model.name} revision ${revision}`,
      text,
    }));
  }

  async function setStatus(user: SessionUser, projectId: string, annotationId: string, status: 'open' | 'resolved'): Promise<Annotation> {
    await annotator(user, projectId, status === 'resolved' ? 'resolve an annotation' : 're-open an annotation');
    const row = await requireAnnotation(projectId, annotationId);
    if (row.status === status) throw apiErrors.conflict(`the annotation is already ${status}`);
    const [updated] = await db
      .update(annotations)
      .set(status === 'resolved' ? { status, resolvedById: user.id, resolvedAt: new Date() } : { status, resolvedById: null, resolvedAt: null })
      .where(eq(annotations.id, annotationId))
      .returning();
    await recordAudit(db, {
      projectId,
      sifId: row.sifId,
      actor: user,
      action: status === 'resolved' ? 'annotation.resolved' : 'annotation.reopened',
      summary: `${status === 'resolved' ? 'resolved' : 're-opened'} the annotation on ${row.targetKind} ${row.itemId ?? ''}`.trim(),
      details: { annotationId, modelId: row.modelId },
    });
    return (await toAnnotations([updated!], await latestFile(projectId, row.modelId)))[0]!;
  }

  return {
    async list(user: SessionUser, projectId: string, modelId: string, query: AnnotationFilter): Promise<AnnotationList> {
      await loadProjectAccess(db, user, projectId);
      const model = await requireModel(projectId, modelId);
      const revision = query.revision ?? model.latestRevision;
      if (revision === null) return { revision: 0, annotations: [] };
      const { file } = await revisionFile(projectId, modelId, revision, 'revision');
      const rows = await db
        .select()
        .from(annotations)
        .where(
          and(
            eq(annotations.modelId, modelId),
            lte(annotations.revision, revision),
            query.status ? eq(annotations.status, query.status) : undefined,
            query.severity ? eq(annotations.severity, query.severity) : undefined,
          ),
        )
        .orderBy(asc(annotations.createdAt));
      return { revision, annotations: await toAnnotations(rows, file) };
    },

    async create(user: SessionUser, projectId: string, modelId: string, body: CreateAnnotationBody & { body: string }): Promise<Annotation> {
      await annotator(user, projectId, 'annotate a model');
      const model = await requireModel(projectId, modelId);
      const { file } = await revisionFile(projectId, modelId, body.revision, 'revision');
      const target = { kind: body.target.kind, itemId: body.target.itemId ?? null };
      let snapshot: Record<string, unknown> | null = null;
      if (target.kind !== 'model' && target.kind !== 'result') {
        if (!ITEM_KINDS[file.kind].includes(target.kind)) {
          throw apiErrors.invalidField('target.kind', `a ${file.kind} model has no ${target.kind}s (pin to ${ITEM_KINDS[file.kind].join(', ')}, model or result)`);
        }
        const item = modelItems(file).get(itemKey(target.kind, target.itemId!));
        if (!item) throw apiErrors.invalidField('target.itemId', `revision ${body.revision} has no ${target.kind} "${target.itemId}"`);
        snapshot = snapshotOf(item);
      }
      const [row] = await db
        .insert(annotations)
        .values({
          projectId,
          sifId: model.sifId,
          modelId,
          revision: body.revision,
          targetKind: target.kind,
          itemId: target.itemId,
          itemSnapshot: snapshot,
          severity: body.severity,
          body: body.body,
          authorId: user.id,
        })
        .returning();
      await recordAudit(db, {
        projectId,
        sifId: model.sifId,
        actor: user,
        action: 'annotation.created',
        summary: `annotated ${target.kind}${target.itemId ? ` ${target.itemId}` : ''} of ${model.name} revision ${body.revision} (${body.severity})`,
        details: { annotationId: row!.id, modelId, revision: body.revision, target, severity: body.severity },
      });
      await notifier.send(await commentNotices(user, model, body.revision, `${body.severity} on ${target.kind} ${target.itemId ?? ''}:\n\n${body.body}`));
      return (await toAnnotations([row!], file))[0]!;
    },

    async reply(user: SessionUser, projectId: string, annotationId: string, text: string): Promise<Annotation> {
      await annotator(user, projectId, 'reply to an annotation');
      const row = await requireAnnotation(projectId, annotationId);
      await db.insert(annotationReplies).values({ annotationId, authorId: user.id, body: text });
      const model = await requireModel(projectId, row.modelId);
      await recordAudit(db, {
        projectId,
        sifId: row.sifId,
        actor: user,
        action: 'annotation.replied',
        summary: `replied on ${row.targetKind}${row.itemId ? ` ${row.itemId}` : ''} of ${model.name}`,
        details: { annotationId, modelId: row.modelId },
      });
      const notices = await commentNotices(user, model, row.revision, `Reply on ${row.targetKind} ${row.itemId ?? ''}:\n\n${text}`);
      if (row.authorId !== user.id && !notices.some((notice) => notice.toUserId === row.authorId)) {
        notices.push({ kind: 'comment', toUserId: row.authorId, subject: `[Proofline] ${user.displayName} replied to your annotation on ${model.name}`, text });
      }
      await notifier.send(notices);
      return (await toAnnotations([row], await latestFile(projectId, row.modelId)))[0]!;
    },

    resolve: (user: SessionUser, projectId: string, annotationId: string) => setStatus(user, projectId, annotationId, 'resolved'),
    reopen: (user: SessionUser, projectId: string, annotationId: string) => setStatus(user, projectId, annotationId, 'open'),
  };
}
