import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { describeAnnotationTarget } from '../../shared/api/annotations.js';
import type { ResultAnalysis } from '../../shared/api/results.js';
import type { Sif } from '../../shared/api/sifs.js';
import { modelFile, type ModelFile } from '../../shared/model-file.js';
import { silReached } from '../../shared/sil.js';
import type { SolveResult } from '../../shared/solve-result.js';
import { architecturalConstraints, silClaim, spuriousTripRate } from '../../solver/analysis/index.js';
import type { SessionUser } from '../auth/session-user.js';
import type { Database } from '../db/client.js';
import { modelRevisions, models } from '../db/schema/models.js';
import { annotations, reviewRounds } from '../db/schema/reviews.js';
import { sifs } from '../db/schema/sifs.js';
import { solveResults, solves, type SolveRow } from '../db/schema/solves.js';
import { users } from '../db/schema/users.js';
import { apiErrors } from '../errors.js';
import { loadProjectAccess } from '../projects/project-access.js';
import { toSif } from '../sifs/sifs-repository.js';

/** A finished exact or Monte Carlo result of the same model content, shown beside the solve's own. */
export interface MethodResult {
  readonly solveId: string;
  readonly method: SolveRow['settings']['method'];
  readonly result: SolveResult;
}

/** Everything the results routes and the report read about one succeeded solve. */
export interface ReportData {
  readonly solve: SolveRow;
  readonly requestedBy: string;
  readonly result: SolveResult;
  readonly model: ModelFile;
  readonly modelName: string;
  readonly sif: Sif;
  readonly projectName: string;
  /** The issued revision solved, with who issued it and why; null for a draft. */
  readonly revision: { number: number; issuedBy: string; issuedAt: Date; reason: string } | null;
  /** The latest succeeded solve of the same content per method (the solve itself included). */
  readonly methods: readonly MethodResult[];
  /** Review rounds of the model (all revisions), oldest first, with names. */
  readonly reviewRounds: readonly { revision: number; status: string; message: string; requestedBy: string; requestedAt: Date; decidedBy: string | null; decidedAt: Date | null; decisionComment: string }[];
  /** Review comments (annotation threads) on the model's items, the whole model and the result figures, oldest first. */
  readonly reviewComments: readonly { revision: number; severity: string; status: string; itemId: string | null; pinnedTo: string; author: string; body: string }[];
  readonly analysis: ResultAnalysis;
}

async function reviewsOf(db: Database, modelId: string): Promise<Pick<ReportData, 'reviewRounds' | 'reviewComments'>> {
  const rounds = await db.select().from(reviewRounds).where(eq(reviewRounds.modelId, modelId)).orderBy(asc(reviewRounds.requestedAt));
  const comments = await db.select().from(annotations).where(eq(annotations.modelId, modelId)).orderBy(asc(annotations.createdAt));
  const ids = [...new Set([...rounds.flatMap((round) => [round.requestedById, round.decidedById ?? round.requestedById]), ...comments.map((comment) => comment.authorId)])];
  const names = new Map((ids.length > 0 ? await db.select({ id: users.id, name: users.displayName }).from(users).where(inArray(users.id, ids)) : []).map((row) => [row.id, row.name]));
  const nameOf = (id: string) => names.get(id) ?? 'a former user';
  return {
    reviewRounds: rounds.map((round) => ({
      revision: round.revision,
      status: round.status,
      message: round.message,
      requestedBy: nameOf(round.requestedById),
      requestedAt: round.requestedAt,
      decidedBy: round.decidedById ? nameOf(round.decidedById) : null,
      decidedAt: round.decidedAt,
      decisionComment: round.decisionComment,
    })),
    reviewComments: comments.map((comment) => ({
      revision: comment.revision,
      severity: comment.severity,
      status: comment.status,
      itemId: comment.itemId,
      pinnedTo: describeAnnotationTarget({ kind: comment.targetKind, itemId: comment.itemId }),
      author: nameOf(comment.authorId),
      body: comment.body,
    })),
  };
}

function measureText(result: SolveResult): string {
  return result.demand === 'low' ? `PFDavg ${result.pfdAvg.toExponential(2)}` : `PFH ${result.pfh.toExponential(2)} per hour`;
}

/** The constraints, SIL claim and spurious trips of a solved model (cheap: no solve). */
export function analyseResult(solveId: string, modelId: string, modelName: string, sif: Sif, model: ModelFile, result: SolveResult, methods: readonly MethodResult[]): ResultAnalysis {
  const notes: string[] = [];
  const constraints = model.kind === 'fault-tree' ? architecturalConstraints(model) : null;
  if (!constraints) notes.push('architectural constraints and spurious trips need a fault tree; this is a state model');
  const measure = result.demand === 'low' ? result.pfdAvg : result.pfh;
  const claim = silClaim({ probabilitySil: silReached(measure, result.demand), demand: result.demand, measureText: measureText(result), constraints });
  return {
    solveId,
    modelId,
    modelName,
    sif: { id: sif.id, tag: sif.tag, title: sif.title, demandMode: sif.demandMode, target: sif.target, derivedTarget: sif.derivedTarget, status: sif.status },
    model,
    constraints,
    claim,
    spuriousTrip: model.kind === 'fault-tree' ? spuriousTripRate(model) : null,
    methods: methods.map((item) => ({
      solveId: item.solveId,
      method: item.method,
      engine: item.result.method,
      algorithm: item.result.algorithm,
      pfdAvg: item.result.pfdAvg,
      pfh: item.result.pfh,
      interval: item.result.interval ?? null,
      samples: item.result.samples ?? null,
    })),
    notes,
  };
}

/**
 * Loads a succeeded solve with its model file, SIF and companions. Any member of the project (or a site
 * admin) may read it; others get 404 from loadProjectAccess. A solve that has not succeeded is a 409.
 */
export async function loadReportData(db: Database, user: SessionUser, projectId: string, solveId: string): Promise<ReportData> {
  const access = await loadProjectAccess(db, user, projectId);
  const [row] = await db
    .select({ solve: solves, result: solveResults.result, requestedBy: users.displayName })
    .from(solves)
    .innerJoin(users, eq(users.id, solves.requestedById))
    .leftJoin(solveResults, eq(solveResults.id, solves.resultId))
    .where(and(eq(solves.projectId, access.project.id), eq(solves.id, solveId)));
  if (!row) throw apiErrors.notFound('no such solve in this project');
  if (row.solve.status !== 'succeeded' || !row.result) throw apiErrors.conflict(`the solve has no result (it is ${row.solve.status})`);
  const parsedModel = modelFile.safeParse(row.solve.model);
  if (!parsedModel.success) throw apiErrors.conflict('the solved model no longer reads as a model file of this version');
  const [modelRow] = await db.select().from(models).where(eq(models.id, row.solve.modelId));
  if (!modelRow) throw apiErrors.notFound('the model of this solve was deleted');
  const [sifRow] = await db
    .select({ sif: sifs, owner: users.displayName })
    .from(sifs)
    .innerJoin(users, eq(users.id, sifs.ownerId))
    .where(eq(sifs.id, modelRow.sifId));
  if (!sifRow) throw apiErrors.notFound('the SIF of this model was deleted');
  const sif = toSif(sifRow.sif, sifRow.owner);

  let revision: ReportData['revision'] = null;
  if (row.solve.revisionId) {
    const [found] = await db
      .select({ revision: modelRevisions, issuedBy: users.displayName })
      .from(modelRevisions)
      .innerJoin(users, eq(users.id, modelRevisions.issuedById))
      .where(eq(modelRevisions.id, row.solve.revisionId));
    if (found) revision = { number: found.revision.number, issuedBy: found.issuedBy, issuedAt: found.revision.issuedAt, reason: found.revision.reason };
  }

  const companions = await db
    .select({ solve: solves, result: solveResults.result })
    .from(solves)
    .innerJoin(solveResults, eq(solveResults.id, solves.resultId))
    .where(and(eq(solves.projectId, access.project.id), eq(solves.contentHash, row.solve.contentHash), eq(solves.status, 'succeeded')))
    .orderBy(desc(solves.createdAt))
    .limit(50);
  const methods: MethodResult[] = [{ solveId: row.solve.id, method: row.solve.settings.method, result: row.result }];
  for (const companion of companions) {
    if (methods.some((item) => item.method === companion.solve.settings.method)) continue;
    methods.push({ solveId: companion.solve.id, method: companion.solve.settings.method, result: companion.result });
  }

  return {
    solve: row.solve,
    requestedBy: row.requestedBy,
    result: row.result,
    model: parsedModel.data,
    modelName: modelRow.name,
    sif,
    projectName: access.project.name,
    revision,
    methods,
    ...(await reviewsOf(db, modelRow.id)),
    analysis: analyseResult(row.solve.id, modelRow.id, modelRow.name, sif, parsedModel.data, row.result, methods),
  };
}
