import { z } from 'zod';

/**
 * The one error body every failing API response carries: `{ error: { code, message, details } }`.
 * `message` is written for a person and names the field at fault; `code` is stable for programs.
 */
export const API_ERROR_CODES = [
  /** 400: a body or query failed its schema; details.issues lists every field at fault. */
  'validation_failed',
  /** 401: not signed in, or the session ended. */
  'unauthenticated',
  /** 401: wrong username or password (never says which). */
  'invalid_credentials',
  /** 403: signed in, but the role does not allow this. */
  'forbidden',
  /** 404: unknown route, or a record this user may not see. */
  'not_found',
  /** 409: the save carried a stale version; details.current holds the stored record. */
  'version_conflict',
  /** 409: a unique name (username, SIF tag in a project) is taken. */
  'already_exists',
  /** 409: the change would break a rule of the stored data (e.g. removing a project's last lead). */
  'conflict',
  /** 413: the body is too large. */
  'payload_too_large',
  /** 429: too many attempts (sign-in). */
  'rate_limited',
  /** 503: the database is unreachable; retry later, nothing was changed. */
  'service_unavailable',
  /** 500: anything unexpected; details are never sent. */
  'internal_error',
] as const;
export type ApiErrorCode = (typeof API_ERROR_CODES)[number];

/** One field at fault in a validation error; `path` is dotted, e.g. "target.value". */
export const validationIssue = z.object({
  path: z.string(),
  message: z.string(),
});
export type ValidationIssue = z.infer<typeof validationIssue>;

export const apiErrorBody = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.unknown().optional(),
  }),
});
export type ApiErrorBody = z.infer<typeof apiErrorBody>;

/** details of a 400 validation_failed error. */
export const validationErrorDetails = z.object({
  issues: z.array(validationIssue),
});
export type ValidationErrorDetails = z.infer<typeof validationErrorDetails>;
