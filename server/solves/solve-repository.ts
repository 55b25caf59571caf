import { and, desc, eq, inArray } from 'drizzle-orm';
import type { Solve, SolveStatus, SolveSummary } from '../../shared/api/solves.js';
import type { Database } from '../db/client.js';
import { solveResults, solves, type NewSolveRow, type SolveRow } from '../db/schema/solves.js';
import { users } from '../db/schema/users.js';

function iso(date: Date | null): string | null {
  return date ? date.toISOString() : null;
}

function toSummary(row: SolveRow, requesterName: string): SolveSummary {
  return {
    id: row.id,
    projectId: row.projectId,
    modelId: row.modelId,
    revisionNumber: row.revisionNumber,
    draftVersion: row.draftVersion,
    contentHash: row.contentHash,
    solverVersion: row.solverVersion,
    settings: row.settings,
    status: row.status,
    progress: row.progress,
    stage: row.stage,
    error: row.error,
    cached: row.cached,
    cancelRequested: row.cancelRequested,
    requestedById: row.requestedById,
    requestedByDisplayName: requesterName,
    createdAt: row.createdAt.toISOString(),
    startedAt: iso(row.startedAt),
    finishedAt: iso(row.finishedAt),
  };
}

/** Queries of solves, each scoped to one project (the caller checked access to it). */
export function solveRepository(db: Database, projectId: string) {
  return {
    async find(solveId: string): Promise<Solve | undefined> {
      const [row] = await db
        .select({ solve: solves, requesterName: users.displayName, result: solveResults.result })
        .from(solves)
        .innerJoin(users, eq(users.id, solves.requestedById))
        .leftJoin(solveResults, eq(solveResults.id, solves.resultId))
        .where(and(eq(solves.projectId, projectId), eq(solves.id, solveId)));
      return row && { ...toSummary(row.solve, row.requesterName), result: row.solve.status === 'succeeded' ? row.result : null };
    },

    async list(modelId: string, filter: { contentHash?: string; status?: SolveStatus }): Promise<SolveSummary[]> {
      const rows = await db
        .select({ solve: solves, requesterName: users.displayName })
        .from(solves)
        .innerJoin(users, eq(users.id, solves.requestedById))
        .where(
          and(
            eq(solves.projectId, projectId),
            eq(solves.modelId, modelId),
            filter.contentHash === undefined ? undefined : eq(solves.contentHash, filter.contentHash),
            filter.status === undefined ? undefined : eq(solves.status, filter.status),
          ),
        )
        .orderBy(desc(solves.createdAt))
        .limit(200);
      return rows.map((row) => toSummary(row.solve, row.requesterName));
    },

    async insert(values: Omit<NewSolveRow, 'projectId'>): Promise<SolveRow> {
      const [row] = await db.insert(solves).values({ ...values, projectId }).returning();
      return row!;
    },

    async setJob(solveId: string, jobId: string): Promise<void> {
      await db.update(solves).set({ jobId }).where(eq(solves.id, solveId));
    },

    async failQueued(solveId: string, error: string): Promise<void> {
      await db.update(solves).set({ status: 'failed', error, finishedAt: new Date() }).where(and(eq(solves.id, solveId), eq(solves.status, 'queued')));
    },

    /** Flags a cancel on an unfinished solve; returns its status and job, or undefined when it had finished. */
    async requestCancel(solveId: string): Promise<{ status: SolveStatus; jobId: string | null } | undefined> {
      const [row] = await db
        .update(solves)
        .set({ cancelRequested: true })
        .where(and(eq(solves.projectId, projectId), eq(solves.id, solveId), inArray(solves.status, ['queued', 'running'])))
        .returning({ status: solves.status, jobId: solves.jobId });
      return row;
    },

    /** Cancels a solve no solver process has taken yet; false when one took it meanwhile. */
    async cancelQueued(solveId: string): Promise<boolean> {
      const rows = await db
        .update(solves)
        .set({ status: 'cancelled', stage: 'cancelled on request', finishedAt: new Date() })
        .where(and(eq(solves.id, solveId), eq(solves.status, 'queued')))
        .returning({ id: solves.id });
      return rows.length > 0;
    },
  };
}

export type SolveRepository = ReturnType<typeof solveRepository>;
