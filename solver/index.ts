import type { z } from 'zod';
import { modelFile, type ModelFile } from '../shared/model-file.js';
import type { SolveResult } from '../shared/solve-result.js';
import { ModelError, SolverUnavailableError, type ModelIssue } from './common/model-error.js';
import { solveFaultTree } from './fault-tree/solve-fault-tree.js';
import { solveMarkovModel } from './markov/index.js';
import { simulateFaultTreeModel } from './montecarlo/index.js';
import type { SolveOptions } from './solve-options.js';

export { ModelError, SolverUnavailableError, type ModelIssue } from './common/model-error.js';
export type { SolveOptions } from './solve-options.js';

/** Version of the numerical engines, stored with every result. */
export const SOLVER_VERSION = '1.0.0';

/**
 * Zod issues as path + message. A failed union (an event that is neither a rate event nor a probability
 * event) is replaced by the issues of the branch that came closest, so the user reads "lambdaDD:
 * expected number, received NaN" rather than "invalid input".
 */
function plainIssues(issue: z.core.$ZodIssue, prefix: PropertyKey[]): ModelIssue[] {
  const path = [...prefix, ...issue.path];
  if (issue.code === 'invalid_union' && issue.errors.length > 0) {
    const closest = [...issue.errors].sort((a, b) => a.length - b.length)[0];
    return closest.flatMap((inner) => plainIssues(inner, path));
  }
  return [{ path: path.map((part) => (typeof part === 'number' ? part : String(part))), message: issue.message }];
}

/**
 * Solves a model file: the exact fault-tree engine (decision diagram), the Markov engine or the Monte
 * Carlo engine, by the model's kind and options.method.
 * @throws ModelError when the model fails the model file schema or is beyond an engine limit; each issue
 *   names its path in the file.
 * @throws the signal's reason when options.signal is aborted.
 */
export function solveModel(model: ModelFile, options: SolveOptions = {}): SolveResult {
  const parsed = modelFile.safeParse(model);
  if (!parsed.success) throw new ModelError(parsed.error.issues.flatMap((issue) => plainIssues(issue, [])));
  const checked = parsed.data;
  if (options.timePoints !== undefined && (!Number.isInteger(options.timePoints) || options.timePoints < 2 || options.timePoints > 1_000_000)) {
    throw new RangeError(`timePoints must be an integer from 2 to 1,000,000 (got ${options.timePoints})`);
  }
  if (options.method === 'montecarlo') {
    if (checked.kind !== 'fault-tree') throw new SolverUnavailableError('Monte Carlo simulation is for fault trees; a state model is solved exactly');
    return simulateFaultTreeModel(checked, { ...options, solverVersion: SOLVER_VERSION });
  }
  if (checked.kind === 'markov') return solveMarkovModel(checked, { ...options, solverVersion: SOLVER_VERSION });
  return solveFaultTree(checked, options, SOLVER_VERSION);
}
