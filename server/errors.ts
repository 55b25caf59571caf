import type { ApiErrorCode, ValidationIssue } from '../shared/api/errors.js';

/** An error a service throws on purpose; the error middleware renders it as `{ error: { code, message, details } }`. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: ApiErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

/** The one factory for the errors services throw. */
export const apiErrors = {
  validation: (issues: readonly ValidationIssue[]) =>
    new ApiError(
      400,
      'validation_failed',
      issues.map((issue) => (issue.path ? `${issue.path}: ${issue.message}` : issue.message)).join('; '),
      { issues },
    ),
  invalidField: (path: string, message: string) => apiErrors.validation([{ path, message }]),
  unauthenticated: (message = 'sign in first') => new ApiError(401, 'unauthenticated', message),
  invalidCredentials: () => new ApiError(401, 'invalid_credentials', 'wrong username or password'),
  forbidden: (message: string) => new ApiError(403, 'forbidden', message),
  notFound: (message: string) => new ApiError(404, 'not_found', message),
  versionConflict: (message: string, current: unknown) => new ApiError(409, 'version_conflict', message, { current }),
  alreadyExists: (path: string, message: string) =>
    new ApiError(409, 'already_exists', `${path}: ${message}`, { issues: [{ path, message }] }),
  conflict: (message: string) => new ApiError(409, 'conflict', message),
  payloadTooLarge: (message: string) => new ApiError(413, 'payload_too_large', message),
  rateLimited: (message: string) => new ApiError(429, 'rate_limited', message),
  serviceUnavailable: () =>
    new ApiError(503, 'service_unavailable', 'the database is unreachable; nothing was changed, try again shortly'),
};
