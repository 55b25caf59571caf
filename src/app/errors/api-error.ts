import { HttpErrorResponse } from '@angular/common/http';
import { apiErrorBody, validationErrorDetails, type ValidationIssue } from '../../../shared/api/errors.js';

/**
 * A failed API call as the app handles it: the HTTP status plus the server's `{ code, message, details }`
 * when the body carries them, or a message of our own when it does not (no connection, a proxy's page).
 */
export class ApiError extends Error {
  override readonly name = 'ApiError';

  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details: unknown,
  ) {
    super(message);
  }

  /** The fields at fault of a 400 validation error, or none. */
  get issues(): readonly ValidationIssue[] {
    const parsed = validationErrorDetails.safeParse(this.details);
    return parsed.success ? parsed.data.issues : [];
  }
}

export function toApiError(response: HttpErrorResponse): ApiError {
  const body = apiErrorBody.safeParse(response.error);
  if (body.success) {
    const { code, message, details } = body.data.error;
    return new ApiError(response.status, code, message, details);
  }
  if (response.status === 0) {
    return new ApiError(0, 'network_error', 'The Proofline server could not be reached. Check the connection and try again.', null);
  }
  const status = [response.status, response.statusText].filter(Boolean).join(' ');
  return new ApiError(response.status, 'unexpected_response', `The server answered ${status} without an explanation.`, null);
}

export function isApiError(error: unknown, status?: number): error is ApiError {
  return error instanceof ApiError && (status === undefined || error.status === status);
}
