import { z } from 'zod';
import { solveResult } from '../solve-result.js';
import { recordId, timestamp } from './common.js';

/**
 * Solves of a model's draft or of an issued revision. A solve runs in a solver process (pg-boss queue,
 * worker threads), never in the API's request thread; progress and the outcome stream by server-sent
 * events. A result is stored once per model content hash, solver version and settings: asking again
 * returns the stored result at once (`cached: true`).
 * Roles (decision): every member (viewer, reviewer, engineer, lead) reads solves, results and their
 * events, so a reviewer sees the numbers of the revision under review and a viewer the published
 * figures; leads and engineers start and cancel solves, which spend shared computing time and change
 * what the model's latest numbers are. Reviewers and viewers get 403 for those.
 */
export const SOLVE_METHODS = ['exact', 'montecarlo'] as const;

/** Solve settings; `samples` and `seed` count only for Monte Carlo and are dropped for exact solves. */
export const solveSettings = z
  .strictObject({
    method: z.enum(SOLVE_METHODS, { message: 'must be exact or montecarlo' }).default('exact'),
    timePoints: z.number({ message: 'must be a whole number' }).int('must be a whole number').min(10, 'must be 10 or more').max(20_000, 'must be 20000 or less').default(1000),
    samples: z.number({ message: 'must be a whole number' }).int('must be a whole number').min(100, 'must be 100 or more').max(10_000_000, 'must be 10000000 or less').default(10_000),
    seed: z.number({ message: 'must be a whole number' }).int('must be a whole number').min(0, 'must be 0 or more').max(2 ** 31 - 1, 'must be below 2^31').default(1),
  })
  .transform(({ method, timePoints, samples, seed }) => (method === 'exact' ? { method, timePoints } : { method, timePoints, samples, seed }));
export type SolveSettings = z.output<typeof solveSettings>;
export type SolveSettingsInput = z.input<typeof solveSettings>;

/** What to solve: the draft at the version the client shows, or an issued revision. */
export const solveSource = z.discriminatedUnion(
  'kind',
  [
    z.strictObject({
      kind: z.literal('draft'),
      version: z.number({ message: 'must be the draft version you read' }).int('must be a whole number').min(1, 'must be 1 or more'),
    }),
    z.strictObject({
      kind: z.literal('revision'),
      number: z.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more'),
    }),
  ],
  { message: 'must be { kind: "draft", version } or { kind: "revision", number }' },
);
export type SolveSource = z.infer<typeof solveSource>;

/** POST /api/projects/:projectId/models/:modelId/solves */
export const startSolveBody = z.strictObject({
  source: solveSource,
  settings: solveSettings.default({ method: 'exact', timePoints: 1000 }),
});
export type StartSolveBody = z.input<typeof startSolveBody>;

/**
 * queued -> running -> succeeded | failed | cancelled; queued -> cancelled. `failed` carries the reason
 * in `error` (the solver's message, the time limit, or a worker that stopped).
 */
export const SOLVE_STATUSES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export const solveStatus = z.enum(SOLVE_STATUSES);
export type SolveStatus = z.infer<typeof solveStatus>;

export const FINISHED_SOLVE_STATUSES: readonly SolveStatus[] = ['succeeded', 'failed', 'cancelled'];

export const solve = z.object({
  id: recordId,
  projectId: recordId,
  modelId: recordId,
  /** The revision solved, or null for a draft. */
  revisionNumber: z.number().int().min(1).nullable(),
  /** The draft version solved, or null for a revision. */
  draftVersion: z.number().int().min(1).nullable(),
  contentHash: z.string(),
  /** The solver version of the result (or, until there is one, of the API that queued the solve). */
  solverVersion: z.string(),
  settings: z.object({
    method: z.enum(SOLVE_METHODS),
    timePoints: z.number().int(),
    samples: z.number().int().optional(),
    seed: z.number().int().optional(),
  }),
  status: solveStatus,
  /** Fraction done in [0, 1]. */
  progress: z.number().min(0).max(1),
  stage: z.string().nullable(),
  error: z.string().nullable(),
  /** True when the result was found stored and nothing was computed. */
  cached: z.boolean(),
  cancelRequested: z.boolean(),
  requestedById: recordId,
  requestedByDisplayName: z.string(),
  createdAt: timestamp,
  startedAt: timestamp.nullable(),
  finishedAt: timestamp.nullable(),
  /** Present when status is succeeded. */
  result: solveResult.nullable(),
});
export type Solve = z.infer<typeof solve>;

/** A solve without its result, as listed and as sent in "status" events. */
export const solveSummary = solve.omit({ result: true });
export type SolveSummary = z.infer<typeof solveSummary>;

export const solveList = z.array(solveSummary);
export type SolveList = z.infer<typeof solveList>;

/** GET .../models/:modelId/solves: newest first; ?revision=N keeps the solves of that revision's content. */
export const solveListQuery = z.object({
  revision: z.coerce.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more').optional(),
  status: solveStatus.optional(),
});
export type SolveListQuery = z.input<typeof solveListQuery>;

/**
 * GET /api/projects/:projectId/solves/:solveId/events (text/event-stream). Events:
 * - `status` (data: solveSummary) first, and at every change of status;
 * - `progress` (data: solveProgressEvent) while running;
 * - `done` (data: solve, with the result when succeeded) last; then the server ends the stream.
 */
export const solveProgressEvent = z.object({
  progress: z.number().min(0).max(1),
  stage: z.string().nullable(),
});
export type SolveProgressEvent = z.infer<typeof solveProgressEvent>;
