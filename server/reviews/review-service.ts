import { aliasedTable, and, desc, eq, inArray } from 'drizzle-orm';
import type { ProjectRole } from '../../shared/api/projects.js';
import {
  REVIEWER_ROLES,
  type DecideReviewBody,
  type RequestReviewBody,
  type ReturnReviewBody,
  type ReviewRound,
  type RevisionDiff,
} from '../../shared/api/reviews.js';
import { canEditModels } from '../../shared/api/models.js';
import { diffModels } from '../../shared/model-diff.js';
import type { SessionUser } from '../auth/session-user.js';
import { recordAudit } from '../audit/audit-trail.js';
import type { Database } from '../db/client.js';
import { modelRevisions, models } from '../db/schema/models.js';
import { projectMembers } from '../db/schema/projects.js';
import { annotations, reviewRoundReviewers, reviewRounds, type ReviewRoundRow } from '../db/schema/reviews.js';
import { sifs } from '../db/schema/sifs.js';
import { solveResults, solves } from '../db/schema/solves.js';
import { users } from '../db/schema/users.js';
import { apiErrors } from '../errors.js';
import type { Notifier } from '../mail/notifier.js';
import { requireModelFile } from '../models/model-file-check.js';
import { modelRepository } from '../models/model-repository.js';
import { loadProjectAccess, requireActiveProject, roleForbids, type ProjectAccess } from '../projects/project-access.js';
import { moveSifStatus } from './sif-status.js';

const isReviewerRole = (role: ProjectRole | null) => role !== null && REVIEWER_ROLES.includes(role);

/** Review rounds: request, queue, approve or return; the SIF status follows (roles: shared/api/index.ts). */
export function createReviewService(db: Database, notifier: Notifier) {
  const requester = aliasedTable(users, 'requester');

  async function toRounds(rows: readonly ReviewRoundRow[]): Promise<ReviewRound[]> {
    if (rows.length === 0) return [];
    const ids = rows.map((row) => row.id);
    const [facts, reviewers] = await Promise.all([
      db
        .select({ id: reviewRounds.id, sifTag: sifs.tag, modelName: models.name, modelKind: models.kind, requesterName: requester.displayName })
        .from(reviewRounds)
        .innerJoin(sifs, eq(sifs.id, reviewRounds.sifId))
        .innerJoin(models, eq(models.id, reviewRounds.modelId))
        .innerJoin(requester, eq(requester.id, reviewRounds.requestedById))
        .where(inArray(reviewRounds.id, ids)),
      db
        .select({ roundId: reviewRoundReviewers.roundId, userId: users.id, displayName: users.displayName })
        .from(reviewRoundReviewers)
        .innerJoin(users, eq(users.id, reviewRoundReviewers.userId))
        .where(inArray(reviewRoundReviewers.roundId, ids))
        .orderBy(users.displayName),
    ]);
    const factOf = new Map(facts.map((fact) => [fact.id, fact]));
    return rows.map((row) => {
      const fact = factOf.get(row.id)!;
      return {
        id: row.id,
        projectId: row.projectId,
        sifId: row.sifId,
        sifTag: fact.sifTag,
        modelId: row.modelId,
        modelName: fact.modelName,
        modelKind: fact.modelKind,
        revision: row.revision,
        message: row.message,
        status: row.status,
        requestedById: row.requestedById,
        requestedByDisplayName: fact.requesterName,
        requestedAt: row.requestedAt.toISOString(),
        reviewers: reviewers.filter((reviewer) => reviewer.roundId === row.id).map(({ userId, displayName }) => ({ userId, displayName })),
        decidedById: row.decidedById,
        decidedAt: row.decidedAt?.toISOString() ?? null,
        decisionComment: row.decisionComment,
      };
    });
  }

  async function requireRound(projectId: string, roundId: string): Promise<ReviewRoundRow> {
    const [row] = await db.select().from(reviewRounds).where(and(eq(reviewRounds.projectId, projectId), eq(reviewRounds.id, roundId)));
    if (!row) throw apiErrors.notFound('no such review round in this project');
    return row;
  }

  async function requireModel(projectId: string, modelId: string) {
    const model = await modelRepository(db, projectId).findRow(modelId);
    if (!model) throw apiErrors.notFound('no such model in this project');
    return model;
  }

  async function issuerOf(modelId: string, revision: number): Promise<string | undefined> {
    const [row] = await db
      .select({ issuedById: modelRevisions.issuedById })
      .from(modelRevisions)
      .where(and(eq(modelRevisions.modelId, modelId), eq(modelRevisions.number, revision)));
    return row?.issuedById;
  }

  async function decide(user: SessionUser, projectId: string, roundId: string, outcome: 'approved' | 'returned', comment: string): Promise<ReviewRound> {
    const access = await loadProjectAccess(db, user, projectId);
    const round = await requireRound(projectId, roundId);
    const doing = outcome === 'approved' ? 'approve a revision' : 'return a revision';
    if (!isReviewerRole(access.role)) throw roleForbids(access, doing);
    requireActiveProject(access);
    const [asked] = await db
      .select()
      .from(reviewRoundReviewers)
      .where(and(eq(reviewRoundReviewers.roundId, roundId), eq(reviewRoundReviewers.userId, user.id)));
    if (!asked) throw apiErrors.forbidden('you are not one of the reviewers chosen for this round');
    if (round.requestedById === user.id || (await issuerOf(round.modelId, round.revision)) === user.id) {
      throw apiErrors.forbidden('authors do not review their own revision');
    }
    if (round.status !== 'open') throw apiErrors.conflict(`this review round was already ${round.status}`);
    const model = await requireModel(projectId, round.modelId);
    if (model.latestRevision !== round.revision) {
      throw apiErrors.conflict(`revision ${round.revision} was followed by revision ${model.latestRevision}; ask for a review of the latest one`);
    }
    if (outcome === 'approved') {
      const openMustFix = await db
        .select({ id: annotations.id })
        .from(annotations)
        .where(and(eq(annotations.modelId, round.modelId), eq(annotations.status, 'open'), eq(annotations.severity, 'must-fix')));
      if (openMustFix.length > 0) {
        throw apiErrors.conflict(`${openMustFix.length} must-fix annotation(s) are still open; they must be resolved before approval`);
      }
    }
    const [decided] = await db
      .update(reviewRounds)
      .set({ status: outcome, decidedById: user.id, decidedAt: new Date(), decisionComment: comment })
      .where(and(eq(reviewRounds.id, roundId), eq(reviewRounds.status, 'open')))
      .returning();
    if (!decided) throw apiErrors.conflict('this review round was decided by someone else just now');
    await moveSifStatus(db, round.sifId, outcome === 'approved' ? 'approved' : 'draft');
    const [sif] = await db.select({ tag: sifs.tag }).from(sifs).where(eq(sifs.id, round.sifId));
    const verb = outcome === 'approved' ? 'approved' : 'returned';
    await recordAudit(db, {
      projectId,
      sifId: round.sifId,
      actor: user,
      action: outcome === 'approved' ? 'review.approved' : 'review.returned',
      summary: `${verb} revision ${round.revision} of ${model.name}${comment ? `: ${comment}` : ''}`,
      details: { roundId, modelId: round.modelId, revision: round.revision, comment },
    });
    await notifier.send([
      {
        kind: outcome === 'approved' ? 'review-approved' : 'review-returned',
        toUserId: round.requestedById,
        subject: `[Proofline] ${sif?.tag ?? 'SIF'} ${model.name} revision ${round.revision} ${verb} by ${user.displayName}`,
        text: `${user.displayName} ${verb} revision ${round.revision} of ${model.name}.\n\n${comment}`,
      },
    ]);
    return (await toRounds([decided]))[0]!;
  }

  async function latestResult(modelId: string, revision: number) {
    const [row] = await db
      .select({ result: solveResults.result })
      .from(solves)
      .innerJoin(solveResults, eq(solveResults.id, solves.resultId))
      .where(and(eq(solves.modelId, modelId), eq(solves.revisionNumber, revision), eq(solves.status, 'succeeded')))
      .orderBy(desc(solves.finishedAt))
      .limit(1);
    return row?.result;
  }

  return {
    async request(user: SessionUser, projectId: string, modelId: string, body: RequestReviewBody & { message: string }): Promise<ReviewRound> {
      const access: ProjectAccess = await loadProjectAccess(db, user, projectId);
      if (!canEditModels(access.role)) throw roleForbids(access, 'request a review');
      requireActiveProject(access);
      const model = await requireModel(projectId, modelId);
      const [sif] = await db.select().from(sifs).where(eq(sifs.id, model.sifId));
      if (!sif || sif.archived) throw apiErrors.conflict('the SIF is archived; restore it before asking for a review');
      if (model.latestRevision === null) throw apiErrors.conflict('issue a revision of the model before asking for a review');
      if (body.revision !== model.latestRevision) {
        throw apiErrors.invalidField('revision', `must be the latest issued revision (${model.latestRevision})`);
      }
      const issuer = await issuerOf(modelId, body.revision);
      const reviewerIds = [...new Set(body.reviewerIds)];
      const members = await db
        .select({ userId: projectMembers.userId, role: projectMembers.role })
        .from(projectMembers)
        .where(and(eq(projectMembers.projectId, projectId), inArray(projectMembers.userId, reviewerIds)));
      const roleOf = new Map(members.map((member) => [member.userId, member.role]));
      for (const [index, reviewerId] of reviewerIds.entries()) {
        const role = roleOf.get(reviewerId) ?? null;
        if (role === null) throw apiErrors.invalidField(`reviewerIds.${index}`, 'is not a member of this project');
        if (!isReviewerRole(role)) throw apiErrors.invalidField(`reviewerIds.${index}`, `is a ${role}; choose a reviewer or a lead`);
        if (reviewerId === user.id || reviewerId === issuer) {
          throw apiErrors.invalidField(`reviewerIds.${index}`, 'is an author of this revision; authors do not review their own revision');
        }
      }
      const round = await db.transaction(async (tx) => {
        await tx.select({ id: models.id }).from(models).where(eq(models.id, modelId)).for('update');
        const [open] = await tx.select({ id: reviewRounds.id }).from(reviewRounds).where(and(eq(reviewRounds.modelId, modelId), eq(reviewRounds.status, 'open')));
        if (open) throw apiErrors.conflict('a review of this model is already open; wait for its decision');
        const [row] = await tx
          .insert(reviewRounds)
          .values({ projectId, sifId: model.sifId, modelId, revision: body.revision, message: body.message, requestedById: user.id })
          .returning();
        await tx.insert(reviewRoundReviewers).values(reviewerIds.map((userId) => ({ roundId: row!.id, userId })));
        return row!;
      });
      await moveSifStatus(db, model.sifId, 'in-review');
      await recordAudit(db, {
        projectId,
        sifId: model.sifId,
        actor: user,
        action: 'review.requested',
        summary: `asked for a review of revision ${body.revision} of ${model.name}`,
        details: { roundId: round.id, modelId, revision: body.revision, reviewerIds, message: body.message },
      });
      await notifier.send(
        reviewerIds.map((toUserId) => ({
          kind: 'review-requested' as const,
          toUserId,
          subject: `[Proofline] Review requested: ${sif.tag} ${model.name} revision ${body.revision}`,
          text: `${user.displayName} asks you to review revision ${body.revision} of ${model.name} (${sif.tag}).\n\n${body.message}`,
        })),
      );
      return (await toRounds([round]))[0]!;
    },

    /** Open rounds the user was chosen for, in every project they still belong to, oldest first. */
    async queue(user: SessionUser): Promise<ReviewRound[]> {
      const rows = await db
        .select({ round: reviewRounds })
        .from(reviewRounds)
        .innerJoin(reviewRoundReviewers, and(eq(reviewRoundReviewers.roundId, reviewRounds.id), eq(reviewRoundReviewers.userId, user.id)))
        .innerJoin(projectMembers, and(eq(projectMembers.projectId, reviewRounds.projectId), eq(projectMembers.userId, user.id)))
        .where(eq(reviewRounds.status, 'open'))
        .orderBy(reviewRounds.requestedAt);
      return toRounds(rows.map((row) => row.round));
    },

    async listBySif(user: SessionUser, projectId: string, sifId: string): Promise<ReviewRound[]> {
      await loadProjectAccess(db, user, projectId);
      const rows = await db
        .select()
        .from(reviewRounds)
        .where(and(eq(reviewRounds.projectId, projectId), eq(reviewRounds.sifId, sifId)))
        .orderBy(desc(reviewRounds.requestedAt));
      return toRounds(rows);
    },

    async get(user: SessionUser, projectId: string, roundId: string): Promise<ReviewRound> {
      await loadProjectAccess(db, user, projectId);
      return (await toRounds([await requireRound(projectId, roundId)]))[0]!;
    },

    approve(user: SessionUser, projectId: string, roundId: string, body: DecideReviewBody & { comment: string }): Promise<ReviewRound> {
      return decide(user, projectId, roundId, 'approved', body.comment);
    },

    returnRound(user: SessionUser, projectId: string, roundId: string, body: ReturnReviewBody): Promise<ReviewRound> {
      return decide(user, projectId, roundId, 'returned', body.comment);
    },

    /** Items added, removed and changed from one revision to another, and the stored results' figures of both. */
    async diff(user: SessionUser, projectId: string, modelId: string, from: number, to: number): Promise<RevisionDiff> {
      await loadProjectAccess(db, user, projectId);
      const repository = modelRepository(db, projectId);
      await requireModel(projectId, modelId);
      const [before, after] = await Promise.all([repository.findRevisionRow(modelId, from), repository.findRevisionRow(modelId, to)]);
      if (!before) throw apiErrors.invalidField('from', `the model has no revision ${from}`);
      if (!after) throw apiErrors.invalidField('to', `the model has no revision ${to}`);
      const items = diffModels(requireModelFile(before.content, 'from'), requireModelFile(after.content, 'to'));
      const [oldResult, newResult] = await Promise.all([latestResult(modelId, from), latestResult(modelId, to)]);
      const results =
        oldResult && newResult
          ? (['pfdAvg', 'pfdMax', 'pfh', 'rrf', 'sil'] as const).map((figure) => ({ figure, old: oldResult[figure], new: newResult[figure] }))
          : null;
      return { from, to, items: items.map((item) => ({ ...item, fields: [...item.fields] })), results };
    },
  };
}

export type ReviewService = ReturnType<typeof createReviewService>;
