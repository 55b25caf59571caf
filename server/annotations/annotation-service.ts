import { aliasedTable, and, asc, desc, eq, inArray, lte, sql } from 'drizzle-orm';
import {
  describeAnnotationTarget,
  isResultFigure,
  type Annotation,
  type AnnotationFilter,
  type AnnotationList,
  type AnnotationTargetKind,
  type CreateAnnotationBody,
} from '../../shared/api/annotations.js';
import { ANNOTATOR_ROLES } from '../../shared/api/reviews.js';
import { fieldChanges, itemKey, modelItems, type ModelItem, type ModelItemKind } from '../../shared/model-diff.js';
import type { ModelFile } from '../../shared/model-file.js';
import type { SolveResult } from '../../shared/solve-result.js';
import type { SessionUser } from '../auth/session-user.js';
import { recordAudit } from '../audit/audit-trail.js';
import type { Database } from '../db/client.js';
import type { ModelRevisionRow, ModelRow } from '../db/schema/models.js';
import { annotationReplies, annotations, type AnnotationRow } from '../db/schema/reviews.js';
import { solveResults, solves } from '../db/schema/solves.js';
import { users } from '../db/schema/users.js';
import { apiErrors } from '../errors.js';
import type { Notice, Notifier } from '../mail/notifier.js';
import { requireModelFile } from '../models/model-file-check.js';
import { modelRepository } from '../models/model-repository.js';
import { loadProjectAccess, requireActiveProject, roleForbids, type ProjectAccess } from '../projects/project-access.js';
import { FIGURE_SOURCE, figureChange, figureValues, type FigureSnapshot } from './result-figures.js';

const ITEM_KINDS: Record<ModelFile['kind'], readonly AnnotationTargetKind[]> = {
  'fault-tree': ['gate', 'event', 'ccf'],
  markov: ['state', 'transition'],
};

/** The item's fields as a plain object, kept with the thread to tell later whether the item changed. */
const snapshotOf = (item: ModelItem) => Object.fromEntries(item.fields);

function itemFromSnapshot(kind: ModelItemKind, id: string, snapshot: unknown): ModelItem {
  return { kind, id, fields: new Map(Object.entries((snapshot ?? {}) as Record<string, unknown>)) };
}

type SolveMethod = 'exact' | 'montecarlo';

/**
 * The revision threads are shown on, with what the outdated rules read from it. Results and content hashes of
 * other revisions are read once per list, when a result-figure thread needs them.
 */
interface ShownRevision {
  readonly number: number;
  readonly file: ModelFile;
  readonly contentHash: string;
  contentHashOf(revision: number): Promise<string | null>;
  resultOf(revision: number, method: SolveMethod): Promise<SolveResult | null>;
}

/** Why an item thread is outdated on the shown revision, or null. */
function itemOutdated(row: AnnotationRow, shown: ShownRevision, items: ReadonlyMap<string, ModelItem>): string | null {
  const kind = row.targetKind as ModelItemKind;
  const now = items.get(itemKey(kind, row.itemId!));
  if (!now) return `revision ${shown.number} has no ${kind} ${row.itemId}`;
  return fieldChanges(itemFromSnapshot(kind, row.itemId!, row.itemSnapshot), now).length > 0 ? `the ${kind} changed since revision ${row.revision}` : null;
}

/**
 * Why a result-figure thread is outdated on the shown revision, or null. The rule: a thread is current while
 * the model content is the one it was written on (results follow from the content). Once the content changed,
 * the figure's values (result-figures.ts, at the 3 significant digits the page shows) are computed again for
 * the shown revision, from the model file or from the revision's latest succeeded solve by the same method,
 * and the thread is outdated when they differ. It is outdated too when they cannot be compared: the shown
 * revision has no such result yet, or the thread's revision had none when it was written.
 */
async function figureOutdated(row: AnnotationRow, shown: ShownRevision): Promise<string | null> {
  const snapshot = row.itemSnapshot as FigureSnapshot | null;
  const writtenOn = snapshot?.contentHash ?? (await shown.contentHashOf(row.revision));
  if (writtenOn === shown.contentHash) return null;
  const figure = row.itemId;
  const modelChanged = `the model changed since revision ${row.revision}`;
  if (!isResultFigure(figure) || !snapshot?.values) return `${modelChanged} and the figure had no result to compare with`;
  let result: SolveResult | null = null;
  if (FIGURE_SOURCE[figure] === 'result') {
    const method = snapshot.method ?? 'exact';
    result = await shown.resultOf(shown.number, method);
    if (!result) return `${modelChanged}; revision ${shown.number} has no ${method === 'exact' ? 'exact' : 'Monte Carlo'} result yet to compare with`;
  }
  const change = figureChange(snapshot.values, figureValues(figure, shown.file, shown.contentHash, result)!);
  return change === null ? null : `the figure changed since revision ${row.revision}: ${change}`;
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

  async function requireRevision(projectId: string, modelId: string, number: number, field: string): Promise<ModelRevisionRow> {
    const row = await modelRepository(db, projectId).findRevisionRow(modelId, number);
    if (!row) throw apiErrors.invalidField(field, `the model has no revision ${number}`);
    return row;
  }

  /** The solve a result-figure thread is written on: the one named (checked), else the revision's latest succeeded one. */
  async function figureSolve(projectId: string, modelId: string, revision: number, solveId: string | undefined) {
    if (solveId === undefined) return latestSolve(modelId, revision);
    const [row] = await db
      .select({ id: solves.id, settings: solves.settings, result: solveResults.result, revisionNumber: solves.revisionNumber, status: solves.status })
      .from(solves)
      .leftJoin(solveResults, eq(solveResults.id, solves.resultId))
      .where(and(eq(solves.projectId, projectId), eq(solves.modelId, modelId), eq(solves.id, solveId)));
    if (!row || row.revisionNumber !== revision || row.status !== 'succeeded' || !row.result) {
      throw apiErrors.invalidField('solveId', `is not a succeeded solve of revision ${revision} of this model`);
    }
    return { id: row.id, settings: row.settings, result: row.result };
  }

  async function requireAnnotation(projectId: string, annotationId: string): Promise<AnnotationRow> {
    const [row] = await db.select().from(annotations).where(and(eq(annotations.projectId, projectId), eq(annotations.id, annotationId)));
    if (!row) throw apiErrors.notFound('no such annotation in this project');
    return row;
  }

  /** The latest succeeded solve of a revision (by one method, or any), with its result. */
  async function latestSolve(modelId: string, revision: number, method?: SolveMethod) {
    const [row] = await db
      .select({ id: solves.id, settings: solves.settings, result: solveResults.result })
      .from(solves)
      .innerJoin(solveResults, eq(solveResults.id, solves.resultId))
      .where(
        and(
          eq(solves.modelId, modelId),
          eq(solves.revisionNumber, revision),
          eq(solves.status, 'succeeded'),
          method ? sql`${solves.settings}->>'method' = ${method}` : undefined,
        ),
      )
      .orderBy(desc(solves.finishedAt), desc(solves.createdAt))
      .limit(1);
    return row;
  }

  function shownRevision(projectId: string, modelId: string, row: ModelRevisionRow): ShownRevision {
    const hashes = new Map<number, Promise<string | null>>();
    const results = new Map<string, Promise<SolveResult | null>>();
    return {
      number: row.number,
      file: requireModelFile(row.content, 'revision'),
      contentHash: row.contentHash,
      contentHashOf(revision) {
        if (!hashes.has(revision)) hashes.set(revision, modelRepository(db, projectId).findRevisionRow(modelId, revision).then((found) => found?.contentHash ?? null));
        return hashes.get(revision)!;
      },
      resultOf(revision, method) {
        const key = `${revision} ${method}`;
        if (!results.has(key)) results.set(key, latestSolve(modelId, revision, method).then((found) => found?.result ?? null));
        return results.get(key)!;
      },
    };
  }

  /** The revision a model's thread is shown on when it changes alone: the model's latest revision. */
  async function latestShown(projectId: string, modelId: string): Promise<ShownRevision | null> {
    const model = await requireModel(projectId, modelId);
    if (model.latestRevision === null) return null;
    const row = await modelRepository(db, projectId).findRevisionRow(modelId, model.latestRevision);
    return row ? shownRevision(projectId, modelId, row) : null;
  }

  async function toAnnotations(rows: readonly AnnotationRow[], shownOn: ShownRevision | null): Promise<Annotation[]> {
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
    const items = shownOn ? modelItems(shownOn.file) : null;
    const reasons = await Promise.all(
      rows.map(async (row) => {
        if (!shownOn || !items || row.targetKind === 'model') return null;
        return row.targetKind === 'result' ? figureOutdated(row, shownOn) : itemOutdated(row, shownOn, items);
      }),
    );
    return rows.map((row, index) => ({
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
      outdated: reasons[index] !== null,
      outdatedBecause: reasons[index] ?? null,
      solveId: row.targetKind === 'result' ? ((row.itemSnapshot as FigureSnapshot | null)?.solveId ?? null) : null,
      replies: replies
        .filter((reply) => reply.reply.annotationId === row.id)
        .map(({ reply, authorName }) => ({ id: reply.id, authorId: reply.authorId, authorDisplayName: authorName, body: reply.body, createdAt: reply.createdAt.toISOString() })),
    }));
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
      summary: `${status === 'resolved' ? 'resolved' : 're-opened'} the annotation on ${describeAnnotationTarget({ kind: row.targetKind, itemId: row.itemId })}`,
      details: { annotationId, modelId: row.modelId },
    });
    return (await toAnnotations([updated!], await latestShown(projectId, row.modelId)))[0]!;
  }

  return {
    async list(user: SessionUser, projectId: string, modelId: string, query: AnnotationFilter): Promise<AnnotationList> {
      await loadProjectAccess(db, user, projectId);
      const model = await requireModel(projectId, modelId);
      const revision = query.revision ?? model.latestRevision;
      if (revision === null) return { revision: 0, annotations: [] };
      const shown = shownRevision(projectId, modelId, await requireRevision(projectId, modelId, revision, 'revision'));
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
      return { revision, annotations: await toAnnotations(rows, shown) };
    },

    async create(user: SessionUser, projectId: string, modelId: string, body: CreateAnnotationBody & { body: string }): Promise<Annotation> {
      await annotator(user, projectId, 'annotate a model');
      const model = await requireModel(projectId, modelId);
      const revisionRow = await requireRevision(projectId, modelId, body.revision, 'revision');
      const shown = shownRevision(projectId, modelId, revisionRow);
      const file = shown.file;
      const target = { kind: body.target.kind, itemId: body.target.itemId ?? null };
      let snapshot: Record<string, unknown> | FigureSnapshot | null = null;
      if (body.solveId !== undefined && target.kind !== 'result') throw apiErrors.invalidField('solveId', 'is only for an annotation on a result figure');
      if (target.kind === 'result' && isResultFigure(target.itemId)) {
        const solve = await figureSolve(projectId, modelId, body.revision, body.solveId);
        snapshot = {
          figure: target.itemId,
          contentHash: revisionRow.contentHash,
          solveId: solve?.id ?? null,
          method: solve?.settings.method ?? null,
          values: figureValues(target.itemId, file, revisionRow.contentHash, solve?.result ?? null),
        };
      } else if (target.kind !== 'model' && target.kind !== 'result') {
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
        summary: `annotated ${describeAnnotationTarget(target)} of ${model.name} revision ${body.revision} (${body.severity})`,
        details: { annotationId: row!.id, modelId, revision: body.revision, target, severity: body.severity },
      });
      await notifier.send(await commentNotices(user, model, body.revision, `${body.severity} on ${describeAnnotationTarget(target)}:\n\n${body.body}`));
      return (await toAnnotations([row!], shown))[0]!;
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
        summary: `replied on ${describeAnnotationTarget({ kind: row.targetKind, itemId: row.itemId })} of ${model.name}`,
        details: { annotationId, modelId: row.modelId },
      });
      const notices = await commentNotices(user, model, row.revision, `Reply on ${describeAnnotationTarget({ kind: row.targetKind, itemId: row.itemId })}:\n\n${text}`);
      if (row.authorId !== user.id && !notices.some((notice) => notice.toUserId === row.authorId)) {
        notices.push({ kind: 'comment', toUserId: row.authorId, subject: `[Proofline] ${user.displayName} replied to your annotation on ${model.name}`, text });
      }
      await notifier.send(notices);
      return (await toAnnotations([row], await latestShown(projectId, row.modelId)))[0]!;
    },

    resolve: (user: SessionUser, projectId: string, annotationId: string) => setStatus(user, projectId, annotationId, 'resolved'),
    reopen: (user: SessionUser, projectId: string, annotationId: string) => setStatus(user, projectId, annotationId, 'open'),
  };
}
