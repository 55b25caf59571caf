import type { RequestHandler } from 'express';
import { apiErrors } from '../errors.js';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);
const ALLOWED_FETCH_SITES = new Set(['same-origin', 'none']);

/**
 * CSRF protection for state-changing API requests, on top of the SameSite=Strict session cookie.
 * Browsers mark every request with where it came from (Sec-Fetch-Site, and Origin on a POST, PUT, PATCH or
 * DELETE), and a page on another site cannot remove or forge those headers. A change is refused when either
 * header says it came from another site. Requests without either header (curl, the API tests) carry no
 * browser cookie of a victim, so there is nothing to forge. This is the "Fetch Metadata" and "verifying
 * origin with standard headers" defence of the OWASP CSRF Prevention Cheat Sheet, and needs no token in the
 * client.
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
  next();
};

function originHost(origin: string): string | null {
  try {
    return new URL(origin).host;
  } catch {
    return null;
  }
}
