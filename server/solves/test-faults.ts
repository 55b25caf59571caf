import type { ModelFile } from '../../shared/model-file.js';

/**
 * Test-only models that prove the failure handling of the solve service. A model whose name is
 * "test-fault:<fault>" misbehaves in the worker thread, but only when the solver process was started with
 * test faults allowed (NODE_ENV=test or the explicit `allowTestFaults` option); everywhere else such a
 * model is solved like any other.
 * - throw: the worker throws an error.
 * - exit: the worker thread exits with code 3, as a crash would.
 * - hang: the worker spins without ever returning or reporting (only the time limit stops it).
 * - slow:<ms>: the worker reports progress from 0 to 0.5 in 10 steps over <ms> milliseconds, then solves
 *   the model, its progress mapped onto 0.5 to 1.
 */
export type TestFault = { readonly kind: 'throw' } | { readonly kind: 'exit' } | { readonly kind: 'hang' } | { readonly kind: 'slow'; readonly ms: number };

const TEST_FAULT_PREFIX = 'test-fault:';
const TEST_FAULT_EXIT_CODE = 3;

/** The fault a model's name asks for, or undefined for an ordinary model. */
export function testFaultOf(model: ModelFile): TestFault | undefined {
  if (!model.name.startsWith(TEST_FAULT_PREFIX)) return undefined;
  const [kind, argument] = model.name.slice(TEST_FAULT_PREFIX.length).split(':');
  if (kind === 'throw' || kind === 'exit' || kind === 'hang') return { kind };
  if (kind === 'slow') {
    const ms = Number(argument);
    return Number.isFinite(ms) && ms >= 0 ? { kind, ms } : undefined;
  }
  return undefined;
}

function sleepSync(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}

type ProgressCallback = (fraction: number, stage: string) => void;

/**
 * Runs the fault in the calling worker thread; returns only for "slow", after its progress steps, with the
 * progress callback the solver should use next.
 */
export function runTestFault(fault: TestFault, onProgress: ProgressCallback): ProgressCallback {
  switch (fault.kind) {
    case 'throw':
      throw new Error('test fault: the solver threw on purpose');
    case 'exit':
      return process.exit(TEST_FAULT_EXIT_CODE);
    case 'hang':
      for (;;) {
        sleepSync(50);
      }
    case 'slow':
      for (let step = 0; step < 10; step++) {
        onProgress(step / 20, `test fault: slow step ${step + 1} of 10`);
        sleepSync(fault.ms / 10);
      }
      return (fraction, stage) => onProgress(0.5 + fraction / 2, stage);
  }
}
