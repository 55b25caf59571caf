/**
 * The header Proofline's client sends with every API request (src/app/http/app-request-header.ts). A page on
 * another site can send a form (urlencoded or multipart) or text/plain body without asking the server first,
 * but not a custom header: that needs a CORS preflight, which the server never grants. So a state-changing
 * request with one of those bodies and without this header is refused (server/security/cross-site-requests.ts).
 */
export const APP_REQUEST_HEADER = 'X-Proofline-Request';
export const APP_REQUEST_HEADER_VALUE = '1';
