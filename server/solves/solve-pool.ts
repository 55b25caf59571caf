import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import type { ModelFile } from '../../shared/model-file.js';
import type { SolveSettings } from '../../shared/api/solves.js';
import type { SolveTask, SolveTaskOutput, TaskMessage } from './solve-task.js';

export interface SolvePoolOptions {
  /** Worker threads, each running one solve at a time. */
  readonly threads: number;
  /** Lets the test-only fault models misbehave (see test-faults.ts). Never set in production. */
  readonly allowTestFaults: boolean;
  readonly log: (message: string, error?: unknown) => void;
}

export interface SolveRunOptions {
  /** Aborting ends the solve at once: a running worker thread is terminated and replaced. */
  readonly signal: AbortSignal;
  /** Called when a worker thread begins the solve (after any wait for a replaced thread to start). */
  readonly onStarted: () => void;
  readonly onProgress: (fraction: number, stage: string) => void;
}

export interface SolvePool {
  readonly threads: number;
  /** Resolves with the checked result as JSON; rejects with the solver's error or the abort. */
  run(model: ModelFile, settings: SolveSettings, options: SolveRunOptions): Promise<SolveTaskOutput>;
  close(): Promise<void>;
}

/**
 * The worker module sits next to this one; under tsx or vitest it is TypeScript, and the worker threads
 * need the tsx loader to read it (else piscina waits for a worker that never starts).
 */
function workerFile(): { filename: string; execArgv: string[] | undefined } {
  const typescript = import.meta.url.endsWith('.ts');
  const filename = new URL(`./solve-task${typescript ? '.ts' : '.js'}`, import.meta.url).href;
  return { filename, execArgv: typescript ? ['--import', 'tsx'] : undefined };
}

/** A fixed pool of worker threads that run the solver; a thread that crashes is replaced by piscina. */
export function createSolvePool(options: SolvePoolOptions): SolvePool {
  const { filename, execArgv } = workerFile();
  const piscina = new Piscina<SolveTask, SolveTaskOutput>({
    filename,
    execArgv,
    minThreads: options.threads,
    maxThreads: options.threads,
    idleTimeout: Number.POSITIVE_INFINITY,
  });
  piscina.on('error', (error) => options.log('solver worker thread failed', error));

  return {
    threads: options.threads,
    async run(model, settings, runOptions) {
      const { port1, port2 } = new MessageChannel();
      port1.on('message', (message: TaskMessage) => {
        if (message.kind === 'started') runOptions.onStarted();
        else runOptions.onProgress(message.fraction, message.stage);
      });
      try {
        const task: SolveTask = { model, settings, allowTestFaults: options.allowTestFaults, progressPort: port2 };
        return await piscina.run(task, { signal: runOptions.signal, transferList: [port2] });
      } finally {
        port1.close();
      }
    },
    async close() {
      await piscina.destroy();
    },
  };
}
