import { eq } from 'drizzle-orm';
import type { DraftContent } from '../../shared/api/models.js';
import type { z } from 'zod';
import { FINISHED_SOLVE_STATUSES, type Solve, type SolveList, type solveListQuery, type startSolveBody } from '../../shared/api/solves.js';
import type { ModelFile } from '../../shared/model-file.js';
import type { SessionUser } from '../auth/session-user.js';
import type { Database } from '../db/client.js';
import { solveResults } from '../db/schema/solves.js';
import { apiErrors } from '../errors.js';
import { requireModelEditor } from '../models/model-access.js';
import { loadProjectAccess } from '../projects/project-access.js';
import { requireModelFile } from '../models/model-file-check.js';
import { modelRepository } from '../models/model-repository.js';
import type { SolveQueue } from '../queue/solve-queue.js';
import { modelContentHash, resultCacheKey } from './content-hash.js';
import type { SolveEvents } from './solve-events.js';
import { solveRepository } from './solve-repository.js';

export interface SolveServiceOptions {
  readonly db: Database;
  readonly queue: Pick<SolveQueue, 'send' | 'cancel'>;
  readonly events: SolveEvents;
  /** The solver version this API would solve with; used to look up stored results. */
  readonly solverVersion: string;
  /** The solver processes' time limit; a queued job expires a minute after it. */
  readonly timeLimitMs: number;
}

type StartSolve = z.output<typeof startSolveBody>;
type ListSolves = z.output<typeof solveListQuery>;

/** Rules of solves (roles: shared/api/solves.ts). The numerics never run here: jobs go to the queue. */
export function createSolveService(options: SolveServiceOptions) {
  const { db, queue, events } = options;

  async function open(user: SessionUser, projectId: string) {
    const access = await loadProjectAccess(db, user, projectId);
    return { access, solves: solveRepository(db, projectId), models: modelRepository(db, projectId) };
  }

  async function requireSolve(repository: ReturnType<typeof solveRepository>, solveId: string): Promise<Solve> {
    const found = await repository.find(solveId);
    if (!found) throw apiErrors.notFound('no such solve in this project');
    return found;
  }

  return {
    /**
     * Queues a solve of the draft (at the version the caller saw) or of a revision. When a result for the
     * same content, solver version and settings is stored, the solve is answered from it at once.
     */
    async start(user: SessionUser, projectId: string, modelId: string, body: StartSolve): Promise<{ solve: Solve; cached: boolean }> {
      const { access, solves, models } = await open(user, projectId);
      requireModelEditor(access, 'start a solve');
      const model = await models.findRow(modelId);
      if (!model) throw apiErrors.notFound('no such model in this project');
      const { settings } = body;
      let file: ModelFile;
      let source: { revisionId: string | null; revisionNumber: number | null; draftVersion: number | null };
      if (body.source.kind === 'draft') {
        if (body.source.version !== model.draftVersion) {
          const current = await models.findDetail(modelId);
          throw apiErrors.versionConflict(
            `the draft is at version ${model.draftVersion}, not ${body.source.version}; solve the version you see after reloading it`,
            current?.draft,
          );
        }
        file = requireModelFile(model.draftContent, 'draft', model.kind);
        source = { revisionId: null, revisionNumber: null, draftVersion: model.draftVersion };
      } else {
        const revision = await models.findRevisionRow(modelId, body.source.number);
        if (!revision) throw apiErrors.notFound(`the model has no revision ${body.source.number}`);
        file = requireModelFile(revision.content, 'revision');
        source = { revisionId: revision.id, revisionNumber: revision.number, draftVersion: null };
      }
      // Refused here rather than queued to fail: the Monte Carlo engine simulates fault trees only (solver/index.ts).
      if (settings.method === 'montecarlo' && file.kind !== 'fault-tree') {
        throw apiErrors.invalidField('settings.method', 'Monte Carlo simulation is for fault trees; a state model is solved exactly (method "exact")');
      }
      const contentHash = modelContentHash(file);
      const cacheKey = resultCacheKey(contentHash, options.solverVersion, settings);
      const [stored] = await db.select({ id: solveResults.id }).from(solveResults).where(eq(solveResults.cacheKey, cacheKey));
      const now = new Date();
      const base = {
        modelId,
        ...source,
        model: file as DraftContent,
        contentHash,
        solverVersion: options.solverVersion,
        settings,
        requestedById: user.id,
      };
      if (stored) {
        const row = await solves.insert({ ...base, status: 'succeeded', cached: true, progress: 1, stage: 'stored result', resultId: stored.id, startedAt: now, finishedAt: now });
        return { solve: await requireSolve(solves, row.id), cached: true };
      }
      const row = await solves.insert({ ...base, status: 'queued' });
      try {
        const jobId = await queue.send({ solveId: row.id }, options.timeLimitMs / 1000 + 60);
        await solves.setJob(row.id, jobId);
      } catch (error) {
        await solves.failQueued(row.id, 'the solve could not be queued; start it again');
        throw error;
      }
      await events.publish({ kind: 'queued', solveId: row.id });
      return { solve: await requireSolve(solves, row.id), cached: false };
    },

    async get(user: SessionUser, projectId: string, solveId: string): Promise<Solve> {
      const { solves } = await open(user, projectId);
      return requireSolve(solves, solveId);
    },

    /** Solves of a model, newest first; with a revision, every solve of that revision's exact content. */
    async list(user: SessionUser, projectId: string, modelId: string, query: ListSolves): Promise<SolveList> {
      const { solves, models } = await open(user, projectId);
      if (!(await models.findRow(modelId))) throw apiErrors.notFound('no such model in this project');
      let contentHash: string | undefined;
      if (query.revision !== undefined) {
        const revision = await models.findRevisionRow(modelId, query.revision);
        if (!revision) throw apiErrors.notFound(`the model has no revision ${query.revision}`);
        contentHash = revision.contentHash;
      }
      return solves.list(modelId, { contentHash, status: query.status });
    },

    /** Cancels a queued solve at once; a running one is stopped by its solver process within moments. */
    async cancel(user: SessionUser, projectId: string, solveId: string): Promise<Solve> {
      const { access, solves } = await open(user, projectId);
      requireModelEditor(access, 'cancel a solve');
      const flagged = await solves.requestCancel(solveId);
      if (!flagged) {
        const found = await requireSolve(solves, solveId);
        throw apiErrors.conflict(`the solve has already ${found.status === 'cancelled' ? 'been cancelled' : found.status}; there is nothing to cancel`);
      }
      if (flagged.status === 'queued' && (await solves.cancelQueued(solveId))) {
        if (flagged.jobId) await queue.cancel(flagged.jobId);
        await events.publish({ kind: 'status', solveId, status: 'cancelled' });
      } else {
        await events.publish({ kind: 'cancel', solveId });
      }
      return requireSolve(solves, solveId);
    },

    /** The solve as it is now, for the event stream (access is checked by `get` before streaming). */
    async current(projectId: string, solveId: string): Promise<Solve | undefined> {
      return solveRepository(db, projectId).find(solveId);
    },

    isFinished(solve: Pick<Solve, 'status'>): boolean {
      return FINISHED_SOLVE_STATUSES.includes(solve.status);
    },
  };
}

export type SolveService = ReturnType<typeof createSolveService>;

