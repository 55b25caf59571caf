import type { RequestHandler } from 'express';
import { APP_REQUEST_HEADER } from '../../shared/api/request-header.js';
import { apiErrors } from '../errors.js';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);
const ALLOWED_FETCH_SITES = new Set(['same-origin', 'none']);
/** The bodies a page on another site can send without a CORS preflight (the CORS "simple" content types). */
const FORM_LIKE_TYPES = new Set(['text/plain', 'application/x-www-form-urlencoded', 'multipart/form-data']);

/**
 * CSRF protection for state-changing API requests, on top of the SameSite=Strict session cookie.
 * Browsers mark every request with where it came from (Sec-Fetch-Site, and Origin on a POST, PUT, PATCH or
 * DELETE), and a page on another site cannot remove or forge those headers. A change is refused when either
 * header says it came from another site. Requests without either header (curl, the API tests) carry no
 * browser cookie of a victim, so there is nothing to forge. This is the "Fetch Metadata" and "verifying
 * origin with standard headers" defence of the OWASP CSRF Prevention Cheat Sheet, and needs no token in the
 * client.
 *
 * In depth, for a browser that sends neither header: a change whose body is text/plain, urlencoded or
 * multipart (what a cross-site form or a fetch without preflight can send) must also carry the client's
 * custom header (shared/api/request-header.ts), which another site cannot add without a preflight the server
 * never grants. JSON bodies need a preflight anyway.
 */
export const refuseCrossSiteChanges: RequestHandler = (req, _res, next) => {
  if (SAFE_METHODS.has(req.method)) {
    next();
    return;
  }
  const fetchSite = req.get('sec-fetch-site');
  if (fetchSite !== undefined && !ALLOWED_FETCH_SITES.has(fetchSite)) {
    next(apiErrors.forbidden(`a ${req.method} from another site (Sec-Fetch-Site: ${fetchSite}) is refused; use Proofline's own pages`));
    return;
  }
  const origin = req.get('origin');
  if (origin !== undefined && originHost(origin) !== req.get('host')) {
    next(apiErrors.forbidden(`a ${req.method} from another origin (${origin.slice(0, 100)}) is refused; use Proofline's own pages`));
    return;
  }
  const mediaType = (req.get('content-type') ?? '').split(';')[0]!.trim().toLowerCase();
  if (FORM_LIKE_TYPES.has(mediaType) && req.get(APP_REQUEST_HEADER) === undefined) {
    next(apiErrors.forbidden(`a ${req.method} with a ${mediaType} body needs the ${APP_REQUEST_HEADER} header that Proofline's own pages send; send JSON, or use Proofline's pages`));
    return;
  }
  next();
};

function originHost(origin: string): string | null {
  try {
    return new URL(origin).host;
  } catch {
    return null;
  }
}
