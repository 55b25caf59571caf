import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { ApiErrorBody } from '../../shared/api/errors.js';
import { isDatabaseUnavailable, type Logger } from '../db/client.js';
import { ApiError, apiErrors } from '../errors.js';

/** JSON 404 for every /api path no router answered. */
export const unknownApiRoute: RequestHandler = (req) => {
  throw apiErrors.notFound(`no API route ${req.method} ${req.originalUrl.split('?')[0]}`);
};

interface BodyParserError {
  type?: unknown;
  status?: unknown;
}

function toApiError(error: unknown): ApiError | null {
  if (error instanceof ApiError) return error;
  const { type } = (error ?? {}) as BodyParserError;
  if (type === 'entity.parse.failed') return apiErrors.invalidField('body', 'is not valid JSON');
  if (type === 'entity.too.large') return apiErrors.payloadTooLarge('the request body is larger than 1 MB');
  if (type === 'encoding.unsupported' || type === 'charset.unsupported') {
    return apiErrors.invalidField('body', 'must be UTF-8 JSON');
  }
  if (isDatabaseUnavailable(error)) return apiErrors.serviceUnavailable();
  return null;
}

/**
 * The one error renderer: typed errors as they are, database outages as 503, anything else as a bare 500
 * (logged here, never sent).
 */
export function errorMiddleware(logger: Logger): ErrorRequestHandler {
  return (error, req, res, next) => {
    if (res.headersSent) {
      next(error);
      return;
    }
    const known = toApiError(error);
    if (known?.status === 503) logger.warn(`${req.method} ${req.originalUrl}: database unavailable`);
    if (!known) logger.error(`${req.method} ${req.originalUrl} failed`, error);
    const rendered = known ?? new ApiError(500, 'internal_error', 'something went wrong on the server; the error was logged');
    const body: ApiErrorBody = {
      error: { code: rendered.code, message: rendered.message, ...(rendered.details === undefined ? {} : { details: rendered.details }) },
    };
    res.status(rendered.status).json(body);
  };
}
