import type { HttpInterceptorFn } from '@angular/common/http';
import { APP_REQUEST_HEADER, APP_REQUEST_HEADER_VALUE } from '../../../shared/api/request-header.js';

/**
 * Marks every request to Proofline's own API with the custom header the server asks of a form, multipart or
 * text body (shared/api/request-header.ts): another site cannot add it without a CORS preflight. Requests to
 * other hosts are left alone.
 */
export const appRequestHeaderInterceptor: HttpInterceptorFn = (request, next) => {
  const ownApi = request.url.startsWith('/api/') || request.url === '/api';
  return next(ownApi ? request.clone({ setHeaders: { [APP_REQUEST_HEADER]: APP_REQUEST_HEADER_VALUE } }) : request);
};
