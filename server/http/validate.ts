import type { z } from 'zod';
import type { ValidationIssue } from '../../shared/api/errors.js';
import { apiErrors } from '../errors.js';

type Where = 'body' | 'query' | 'params';

function toIssues(error: z.ZodError, where: Where): ValidationIssue[] {
  return error.issues.flatMap((issue): ValidationIssue[] => {
    const path = issue.path.map(String).join('.');
    if (issue.code === 'unrecognized_keys') {
      return issue.keys.map((key) => ({ path: path ? `${path}.${key}` : key, message: 'is not a known field' }));
    }
    if (issue.code === 'invalid_type' && issue.input === undefined) {
      return [{ path: path || where, message: 'is required' }];
    }
    return [{ path: path || where, message: issue.message }];
  });
}

/**
 * Parses request input with a shared schema; a failure becomes a 400 naming every field at fault.
 * The rejected input itself is never echoed back (it may hold a password).
 */
export function parseInput<Schema extends z.ZodType>(schema: Schema, input: unknown, where: Where): z.output<Schema> {
  const result = schema.safeParse(input ?? (where === 'body' ? undefined : {}), { reportInput: true });
  if (!result.success) throw apiErrors.validation(toIssues(result.error, where));
  return result.data;
}
