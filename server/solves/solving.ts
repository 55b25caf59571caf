import { availableParallelism } from 'node:os';
import type pg from 'pg';
import { ConfigError } from '../config.js';
import type { Database, Logger } from '../db/client.js';
import { startSolveQueue } from '../queue/solve-queue.js';
import { connectSolveEvents } from './solve-events.js';
import { startSolverProcess, type SolverProcess } from './solver-process.js';
import type { SolvingDeps } from './solves-router.js';

/** Solve settings read from the environment, shared by `npm start` and `npm run worker`. */
export interface SolvingConfig {
  /** SOLVE_TIME_LIMIT_SECONDS: a solve running longer is stopped and marked failed. Default 600. */
  readonly timeLimitMs: number;
  /** SOLVER_THREADS: worker threads of a solver process. Default: cores - 1, at least 1. */
  readonly threads: number;
  /** PROOFLINE_SOLVER=off runs the API without a solver process (solves wait for `npm run worker`). */
  readonly inProcessSolver: boolean;
}

function positiveNumber(name: string, fallback: number): number {
  const text = process.env[name];
  if (text === undefined || text === '') return fallback;
  const value = Number(text);
  if (!Number.isFinite(value) || value <= 0) throw new ConfigError(`${name} must be a number above 0, not "${text}"`);
  return value;
}

/** Reads SOLVE_TIME_LIMIT_SECONDS, SOLVER_THREADS and PROOFLINE_SOLVER; a wrong value is a ConfigError naming it. */
export function solvingConfigFromEnv(): SolvingConfig {
  const solver = process.env['PROOFLINE_SOLVER'] ?? 'on';
  if (solver !== 'on' && solver !== 'off') throw new ConfigError(`PROOFLINE_SOLVER must be "on" or "off", not "${solver}"`);
  return {
    timeLimitMs: positiveNumber('SOLVE_TIME_LIMIT_SECONDS', 600) * 1000,
    threads: Math.floor(positiveNumber('SOLVER_THREADS', Math.max(1, availableParallelism() - 1))),
    inProcessSolver: solver === 'on',
  };
}

export interface SolvingOptions {
  readonly connectionString: string;
  readonly db: Database;
  readonly pool: pg.Pool;
  readonly logger: Logger;
  readonly solverVersion: string;
  readonly timeLimitMs: number;
  /** Worker threads of the solver process started here; 0 starts none (the API alone). */
  readonly solverThreads: number;
  /** Test-only fault models (server/solves/test-faults.ts); default NODE_ENV === 'test'. */
  readonly allowTestFaults?: boolean;
  /** Heartbeat and stale-solve timing of the solver process (defaults in solver-process.ts). */
  readonly heartbeatMs?: number;
  readonly staleAfterMs?: number;
}

export interface Solving {
  /** For createApp({ solving }). */
  readonly deps: SolvingDeps;
  /** The solver process in this process, when one was started. */
  readonly solver: SolverProcess | null;
  /** Stops the solver process (running solves get up to `timeoutMs`), the queue and the notices. */
  stop(timeoutMs?: number): Promise<void>;
}

/** The API's side of solving (queue producer, notices), plus one solver process unless solverThreads is 0. */
export async function startSolving(options: SolvingOptions): Promise<Solving> {
  const log = (message: string, error?: unknown) => options.logger.error(message, error);
  const events = await connectSolveEvents({ connectionString: options.connectionString, pool: options.pool, log });
  const queue = await startSolveQueue({ connectionString: options.connectionString, applicationName: 'proofline-api', log, maxConnections: 2 });
  const solver =
    options.solverThreads > 0
      ? await startSolverProcess({
          db: options.db,
          pool: options.pool,
          connectionString: options.connectionString,
          threads: options.solverThreads,
          timeLimitMs: options.timeLimitMs,
          allowTestFaults: options.allowTestFaults,
          heartbeatMs: options.heartbeatMs,
          staleAfterMs: options.staleAfterMs,
          events,
          log,
        })
      : null;
  return {
    deps: { queue, events, solverVersion: options.solverVersion, timeLimitMs: options.timeLimitMs },
    solver,
    async stop(timeoutMs = 30_000) {
      await solver?.stop(timeoutMs);
      await queue.stop(timeoutMs);
      await events.close();
    },
  };
}
