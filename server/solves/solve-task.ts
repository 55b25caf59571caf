import { setPriority } from 'node:os';
import type { MessagePort } from 'node:worker_threads';
import type { ModelFile } from '../../shared/model-file.js';
import { solveResult } from '../../shared/solve-result.js';
import type { SolveSettings } from '../../shared/api/solves.js';
import { solveModel } from '../../solver/index.js';
import { runTestFault, testFaultOf } from './test-faults.js';

/** What the solve pool hands to a worker thread. */
export interface SolveTask {
  readonly model: ModelFile;
  readonly settings: SolveSettings;
  readonly allowTestFaults: boolean;
  /** Receives a `started` message, then `progress` messages; closed when the task ends. */
  readonly progressPort: MessagePort;
}

/**
 * A checked result as the worker hands it over: JSON text, so that the request thread neither clones nor
 * checks nor serialises the large result object (that work would delay requests while many solves end).
 */
export interface SolveTaskOutput {
  readonly solverVersion: string;
  readonly resultJson: string;
}

/** Messages from the worker thread to the pool: once `started`, then `progress` at most every 100 ms. */
export type TaskMessage = { readonly kind: 'started' } | { readonly kind: 'progress'; readonly fraction: number; readonly stage: string };

/**
 * Nice value of the solver threads. On Linux the nice value belongs to each thread, and `setPriority(n)`
 * (pid 0) sets it for the calling thread only. The request thread keeps its priority, so reads stay quick
 * while every core is busy solving.
 */
const SOLVER_THREAD_NICE = 10;
setPriority(SOLVER_THREAD_NICE);

/** At most one progress message per this many milliseconds, besides the first and the last. */
const PROGRESS_INTERVAL_MS = 100;

function progressReporter(port: MessagePort) {
  let lastSent = 0;
  let lastStage = '';
  return (fraction: number, stage: string) => {
    const now = Date.now();
    if (now - lastSent < PROGRESS_INTERVAL_MS && stage === lastStage && fraction < 1) return;
    lastSent = now;
    lastStage = stage;
    const message: TaskMessage = { kind: 'progress', fraction: Math.min(1, Math.max(0, fraction)), stage };
    port.postMessage(message);
  };
}

/**
 * Worker-thread entry of the solve pool (piscina): runs the solver on one model. The numerics run here,
 * never on the thread that serves requests; an abort from the pool ends the whole thread.
 */
export default function solveTask(task: SolveTask): SolveTaskOutput {
  const started: TaskMessage = { kind: 'started' };
  task.progressPort.postMessage(started);
  const report = progressReporter(task.progressPort);
  try {
    const fault = task.allowTestFaults ? testFaultOf(task.model) : undefined;
    const onProgress = fault ? runTestFault(fault, report) : report;
    const parsed = solveResult.safeParse(solveModel(task.model, { ...task.settings, onProgress }));
    if (!parsed.success) {
      const first = parsed.error.issues[0];
      throw new Error(`its result does not match the result schema (${first?.path.join('.') || 'result'}: ${first?.message ?? 'invalid'})`);
    }
    return { solverVersion: parsed.data.solverVersion, resultJson: JSON.stringify(parsed.data) };
  } finally {
    task.progressPort.close();
  }
}
