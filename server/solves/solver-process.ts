import { randomBytes } from 'node:crypto';
import { hostname } from 'node:os';
import { and, eq, inArray, lt, notInArray, sql } from 'drizzle-orm';
import type pg from 'pg';
import type { Database } from '../db/client.js';
import type { ModelFile } from '../../shared/model-file.js';
import { solveResults, solves } from '../db/schema/solves.js';
import { startSolveQueue, type SolveJob, type SolveQueue } from '../queue/solve-queue.js';
import { resultCacheKey } from './content-hash.js';
import { connectSolveEvents, type SolveEvents } from './solve-events.js';
import { createSolvePool, type SolvePool } from './solve-pool.js';
import type { SolveTaskOutput } from './solve-task.js';

export interface SolverProcessOptions {
  readonly db: Database;
  readonly pool: pg.Pool;
  readonly connectionString: string;
  /** Worker threads = solves run at once by this process. */
  readonly threads: number;
  /** A solve running longer is stopped and marked failed. */
  readonly timeLimitMs: number;
  /** Lets the test-only fault models misbehave (test-faults.ts). Default: NODE_ENV === 'test'. */
  readonly allowTestFaults?: boolean;
  readonly log: (message: string, error?: unknown) => void;
  /** Shared with the API when both run in one process. */
  readonly events?: SolveEvents;
  /** How often a running solve's heartbeat is written. Default 5 s. */
  readonly heartbeatMs?: number;
  /** A running solve without a heartbeat for this long is marked failed. Default 30 s. */
  readonly staleAfterMs?: number;
}

export interface SolverProcess {
  /** host:pid:random, stored with each solve it runs. */
  readonly name: string;
  /** Stops taking jobs, lets running solves finish (up to `timeoutMs`), then closes threads and connections. */
  stop(timeoutMs?: number): Promise<void>;
}

const CANCELLED = Symbol('cancelled');
const TIME_LIMIT = Symbol('time limit');
const SHUTDOWN = Symbol('shutdown');

/** At most one progress notice per solve in this interval, and one progress row update per second. */
const PROGRESS_NOTICE_MS = 200;
const PROGRESS_WRITE_MS = 1000;

function seconds(ms: number): string {
  return ms < 1000 ? `${ms} ms` : `${Number((ms / 1000).toFixed(1))} s`;
}

/** Turns a failed run into the reason shown to the user; the solver's own messages are kept as they are. */
export function failureReason(error: unknown, abortReason: unknown, timeLimitMs: number): string {
  if (abortReason === SHUTDOWN) return 'stopped: the solver process was shut down while this solve ran; start the solve again';
  if (abortReason === TIME_LIMIT) {
    return `stopped: the solve ran past its time limit of ${seconds(timeLimitMs)} (SOLVE_TIME_LIMIT_SECONDS)`;
  }
  const message = error instanceof Error ? error.message : String(error);
  const exit = /worker exited with code: (\d+)/.exec(message);
  if (exit) {
    return `the solver worker stopped unexpectedly (exit code ${exit[1]}); it was replaced and this solve did not finish`;
  }
  return `the solver failed: ${message}`;
}

/**
 * A solver process: takes solve jobs from the pg-boss queue, runs each in a piscina worker thread and
 * writes progress, outcome and result to the database. Several such processes (on several machines) can
 * share one database; each takes at most `threads` jobs at a time.
 */
export async function startSolverProcess(options: SolverProcessOptions): Promise<SolverProcess> {
  const { db, log, timeLimitMs } = options;
  const name = `${hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`;
  const allowTestFaults = options.allowTestFaults ?? process.env['NODE_ENV'] === 'test';
  const heartbeatMs = options.heartbeatMs ?? 5000;
  const staleAfterMs = options.staleAfterMs ?? 30_000;
  const ownsEvents = options.events === undefined;
  const events: SolveEvents = options.events ?? (await connectSolveEvents({ connectionString: options.connectionString, pool: options.pool, log }));
  const pool: SolvePool = createSolvePool({ threads: options.threads, allowTestFaults, log });
  const running = new Map<string, AbortController>();
  const queue: SolveQueue = await startSolveQueue({ connectionString: options.connectionString, applicationName: 'proofline-solver', log });

  const publish = (notice: Parameters<SolveEvents['publish']>[0]) => events.publish(notice).catch((error) => log('could not send a solve notice', error));

  const unsubscribe = events.subscribe((notice) => {
    if (notice.kind === 'cancel') running.get(notice.solveId)?.abort(CANCELLED);
    if (notice.kind === 'queued') queue.wake();
  });

  const finish = async (solveId: string, changes: Partial<typeof solves.$inferInsert>) => {
    const [row] = await db
      .update(solves)
      .set({ ...changes, finishedAt: new Date(), heartbeatAt: null })
      .where(and(eq(solves.id, solveId), eq(solves.status, 'running')))
      .returning({ status: solves.status });
    if (row) await publish({ kind: 'status', solveId, status: row.status });
  };

  const runSolve = async ({ solveId }: SolveJob) => {
    const controller = new AbortController();
    running.set(solveId, controller);
    try {
      const now = new Date();
      const [claimed] = await db
        .update(solves)
        .set({ status: 'running', startedAt: now, heartbeatAt: now, workerName: name })
        .where(and(eq(solves.id, solveId), eq(solves.status, 'queued')))
        .returning();
      if (!claimed) return;
      await publish({ kind: 'status', solveId, status: 'running' });
      if (claimed.cancelRequested) controller.abort(CANCELLED);

      let lastNotice = 0;
      let lastWrite = 0;
      const onProgress = (fraction: number, stage: string) => {
        const at = Date.now();
        if (at - lastNotice >= PROGRESS_NOTICE_MS || fraction >= 1) {
          lastNotice = at;
          void publish({ kind: 'progress', solveId, progress: fraction, stage });
        }
        if (at - lastWrite >= PROGRESS_WRITE_MS) {
          lastWrite = at;
          db.update(solves)
            .set({ progress: fraction, stage })
            .where(and(eq(solves.id, solveId), eq(solves.status, 'running')))
            .catch((error: unknown) => log('could not store solve progress', error));
        }
      };

      // The time limit counts from the moment a worker thread begins, not while a crashed one is replaced.
      let timer: NodeJS.Timeout | undefined;
      const onStarted = () => {
        timer ??= setTimeout(() => controller.abort(TIME_LIMIT), timeLimitMs);
      };
      let output: SolveTaskOutput;
      try {
        output = await pool.run(claimed.model as ModelFile, claimed.settings, { signal: controller.signal, onStarted, onProgress });
      } catch (error) {
        if (controller.signal.reason === CANCELLED) {
          await finish(solveId, { status: 'cancelled', stage: 'cancelled on request' });
        } else {
          await finish(solveId, { status: 'failed', error: failureReason(error, controller.signal.reason, timeLimitMs) });
        }
        return;
      } finally {
        clearTimeout(timer);
      }

      const { solverVersion, resultJson } = output;
      const cacheKey = resultCacheKey(claimed.contentHash, solverVersion, claimed.settings);
      await db
        .insert(solveResults)
        .values({ cacheKey, contentHash: claimed.contentHash, solverVersion, settings: claimed.settings, result: sql`${resultJson}::jsonb` })
        .onConflictDoNothing({ target: solveResults.cacheKey });
      const [stored] = await db.select({ id: solveResults.id }).from(solveResults).where(eq(solveResults.cacheKey, cacheKey));
      await finish(solveId, { status: 'succeeded', progress: 1, stage: 'done', resultId: stored?.id, solverVersion });
    } finally {
      running.delete(solveId);
    }
  };

  const heartbeat = setInterval(() => {
    const ids = [...running.keys()];
    if (ids.length === 0) return;
    db.update(solves)
      .set({ heartbeatAt: new Date() })
      .where(and(inArray(solves.id, ids), eq(solves.status, 'running')))
      .catch((error: unknown) => log('could not write the solve heartbeat', error));
  }, heartbeatMs);

  // Solves this process is running are never stale to it, however late a heartbeat write is.
  const sweepStale = async () => {
    const own = [...running.keys()];
    const stale = await db
      .update(solves)
      .set({
        status: 'failed',
        finishedAt: new Date(),
        error: 'the solver process running this solve stopped (no heartbeat); start the solve again',
      })
      .where(
        and(
          eq(solves.status, 'running'),
          lt(solves.heartbeatAt, sql`now() - make_interval(secs => ${staleAfterMs / 1000})`),
          own.length > 0 ? notInArray(solves.id, own) : undefined,
        ),
      )
      .returning({ id: solves.id });
    for (const { id } of stale) await publish({ kind: 'status', solveId: id, status: 'failed' });
  };
  const sweeper = setInterval(() => {
    sweepStale().catch((error: unknown) => log('could not sweep stale solves', error));
  }, staleAfterMs / 2);
  await sweepStale();

  await queue.work(options.threads, runSolve);

  return {
    name,
    async stop(timeoutMs = 30_000) {
      await queue.stop(timeoutMs);
      clearInterval(heartbeat);
      clearInterval(sweeper);
      unsubscribe();
      for (const controller of running.values()) controller.abort(SHUTDOWN);
      await pool.close();
      if (ownsEvents) await events.close();
    },
  };
}
