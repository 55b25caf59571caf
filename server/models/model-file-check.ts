import type { ValidationIssue } from '../../shared/api/errors.js';
import type { ModelKind } from '../../shared/api/models.js';
import { formatPath, modelFile, type ModelFile } from '../../shared/model-file.js';
import { apiErrors } from '../errors.js';

export type ModelFileCheck = { readonly file: ModelFile; readonly issues: [] } | { readonly file: null; readonly issues: ValidationIssue[] };

/**
 * Checks content against the model file schema; issue paths are written as in the file
 * ("events[2].lambdaDU"). With `kind`, a file of the other kind is an issue too (a model keeps its kind).
 */
export function checkModelFile(content: unknown, kind?: ModelKind): ModelFileCheck {
  const parsed = modelFile.safeParse(content);
  const issues: ValidationIssue[] = parsed.success ? [] : parsed.error.issues.map((issue) => ({ path: formatPath(issue.path), message: issue.message }));
  if (kind !== undefined && (content as { kind?: unknown } | null)?.kind !== kind && !issues.some((issue) => issue.path === 'kind')) {
    issues.push({ path: 'kind', message: `must be "${kind}", the kind of this model` });
  }
  if (parsed.success && issues.length === 0) return { file: parsed.data, issues: [] };
  return { file: null, issues };
}

/** The valid model file in `content`, or a 400 listing every issue under `prefix` (e.g. "file.events[2].lambdaDU"). */
export function requireModelFile(content: unknown, prefix: string, kind?: ModelKind): ModelFile {
  const check = checkModelFile(content, kind);
  if (check.file) return check.file;
  throw apiErrors.validation(check.issues.map((issue) => ({ path: issue.path === '(file)' ? prefix : `${prefix}.${issue.path}`, message: issue.message })));
}
