import { formatPath } from '../../shared/model-file.js';

/** One problem of a model, located by its path in the file (e.g. ["events", 2, "lambdaDU"]). */
export interface ModelIssue {
  readonly path: readonly (string | number)[];
  readonly message: string;
}

/**
 * A model the solver cannot accept: it fails the model file schema, or it is beyond an engine limit.
 * Each issue names the item and where it is in the file.
 */
export class ModelError extends Error {
  constructor(readonly issues: readonly ModelIssue[]) {
    super(issues.map((issue) => `${formatPath(issue.path)}: ${issue.message}`).join('\n'));
    this.name = 'ModelError';
  }

  /** "path: message" lines, the path written as in the file (events[2].lambdaDU). */
  lines(): string[] {
    return this.issues.map((issue) => `${formatPath(issue.path)}: ${issue.message}`);
  }
}

/** A solve this build has no engine for (e.g. a state model before the Markov engine is linked in). */
export class SolverUnavailableError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'SolverUnavailableError';
  }
}
