import type { Express } from 'express';
import type { ProjectAction } from '../../shared/api/permissions.js';

/**
 * Who may call a route, as declared here beside the route table of shared/api/index.ts:
 * - public: anyone, without a session;
 * - signed-in: any signed-in user (the route itself scopes what that user sees);
 * - admin: site admins only;
 * - project: a member whose role allows the action (shared/api/permissions.ts canDo), or 404;
 * - device-reader / device-editor: the device library's readers and editors (shared/api/index.ts);
 * - review-decider: a reviewer or lead chosen for the round who is not its author;
 * - annotator: a lead, engineer or reviewer of the project.
 */
export type RoutePermission =
  | { readonly kind: 'public' }
  | { readonly kind: 'signed-in' }
  | { readonly kind: 'admin' }
  | { readonly kind: 'project'; readonly action: ProjectAction }
  | { readonly kind: 'device-reader' }
  | { readonly kind: 'device-editor' }
  | { readonly kind: 'review-decider' }
  | { readonly kind: 'annotator' };

const PUBLIC: RoutePermission = { kind: 'public' };
const SIGNED_IN: RoutePermission = { kind: 'signed-in' };
const ADMIN: RoutePermission = { kind: 'admin' };
const DEVICE_READER: RoutePermission = { kind: 'device-reader' };
const DEVICE_EDITOR: RoutePermission = { kind: 'device-editor' };
const ANNOTATOR: RoutePermission = { kind: 'annotator' };
const project = (action: ProjectAction): RoutePermission => ({ kind: 'project', action });

/** Every route of the app, "METHOD path" as Express holds it, with its permission. */
export const ROUTE_PERMISSIONS: Readonly<Record<string, RoutePermission>> = {
  'GET /api/health': PUBLIC,
  'POST /api/auth/sign-in': PUBLIC,
  'POST /api/auth/sign-out': PUBLIC,
  'GET /api/auth/me': SIGNED_IN,
  'POST /api/auth/password': SIGNED_IN,
  'GET /api/users': SIGNED_IN,
  'POST /api/users': ADMIN,
  'PATCH /api/users/:userId': ADMIN,
  'GET /api/projects': SIGNED_IN,
  'POST /api/projects': SIGNED_IN,
  'GET /api/projects/:projectId': project('project.read'),
  'PATCH /api/projects/:projectId': project('project.edit'),
  'POST /api/projects/:projectId/archive': project('project.archive'),
  'GET /api/projects/:projectId/members': project('project.read'),
  'PUT /api/projects/:projectId/members/:userId': project('members.manage'),
  'DELETE /api/projects/:projectId/members/:userId': project('members.manage'),
  'GET /api/projects/:projectId/sifs': project('project.read'),
  'POST /api/projects/:projectId/sifs': project('sif.create'),
  'GET /api/projects/:projectId/sifs/:sifId': project('project.read'),
  'PATCH /api/projects/:projectId/sifs/:sifId': project('sif.edit'),
  'POST /api/projects/:projectId/sifs/:sifId/archive': project('sif.archive'),
  'GET /api/projects/:projectId/sifs/:sifId/models': project('project.read'),
  'POST /api/projects/:projectId/sifs/:sifId/models': project('sif.edit'),
  'GET /api/projects/:projectId/models/:modelId': project('project.read'),
  'PUT /api/projects/:projectId/models/:modelId/draft': project('sif.edit'),
  'POST /api/projects/:projectId/models/:modelId/import': project('sif.edit'),
  'GET /api/projects/:projectId/models/:modelId/export': project('project.read'),
  'GET /api/projects/:projectId/models/:modelId/revisions': project('project.read'),
  'POST /api/projects/:projectId/models/:modelId/revisions': project('sif.edit'),
  'GET /api/projects/:projectId/models/:modelId/revisions/:number': project('project.read'),
  'GET /api/devices/access': SIGNED_IN,
  'GET /api/devices': DEVICE_READER,
  'POST /api/devices': DEVICE_EDITOR,
  'GET /api/devices/export': DEVICE_READER,
  'POST /api/devices/import/preview': DEVICE_EDITOR,
  'POST /api/devices/import/confirm': DEVICE_EDITOR,
  'GET /api/devices/:deviceId': DEVICE_READER,
  'PUT /api/devices/:deviceId': DEVICE_EDITOR,
  'GET /api/devices/:deviceId/versions': DEVICE_READER,
  'GET /api/devices/:deviceId/versions/:version': DEVICE_READER,
  'POST /api/devices/:deviceId/evidence': DEVICE_EDITOR,
  'GET /api/devices/:deviceId/evidence/:evidenceId': DEVICE_READER,
  'DELETE /api/devices/:deviceId/evidence/:evidenceId': DEVICE_EDITOR,
  'POST /api/projects/:projectId/models/:modelId/solves': project('sif.edit'),
  'GET /api/projects/:projectId/models/:modelId/solves': project('project.read'),
  'GET /api/projects/:projectId/solves/:solveId': project('project.read'),
  'POST /api/projects/:projectId/solves/:solveId/cancel': project('sif.edit'),
  'GET /api/projects/:projectId/solves/:solveId/events': project('project.read'),
  'GET /api/projects/:projectId/solves/:solveId/analysis': project('project.read'),
  'GET /api/projects/:projectId/solves/:solveId/report': project('project.read'),
  'GET /api/projects/:projectId/solves/:solveId/csv': project('project.read'),
  'GET /api/reviews/queue': SIGNED_IN,
  'POST /api/projects/:projectId/models/:modelId/reviews': project('sif.edit'),
  'GET /api/projects/:projectId/models/:modelId/diff': project('project.read'),
  'GET /api/projects/:projectId/sifs/:sifId/reviews': project('project.read'),
  'GET /api/projects/:projectId/reviews/:roundId': project('project.read'),
  'POST /api/projects/:projectId/reviews/:roundId/approve': { kind: 'review-decider' },
  'POST /api/projects/:projectId/reviews/:roundId/return': { kind: 'review-decider' },
  'GET /api/projects/:projectId/models/:modelId/annotations': project('project.read'),
  'POST /api/projects/:projectId/models/:modelId/annotations': ANNOTATOR,
  'POST /api/projects/:projectId/annotations/:annotationId/replies': ANNOTATOR,
  'POST /api/projects/:projectId/annotations/:annotationId/resolve': ANNOTATOR,
  'POST /api/projects/:projectId/annotations/:annotationId/reopen': ANNOTATOR,
  'GET /api/projects/:projectId/audit': project('project.read'),
  'GET /api/projects/:projectId/audit/csv': project('project.read'),
  'GET /api/admin/mail': ADMIN,
  'GET /api/me/notices': SIGNED_IN,
  'PUT /api/me/notices': SIGNED_IN,
  // The built Angular client and its files.
  'GET /{*splat}': PUBLIC,
};

interface RouterLayer {
  readonly route?: { readonly path: string; readonly methods: Record<string, boolean> };
  readonly handle?: { readonly stack?: readonly RouterLayer[] };
  readonly slash?: boolean;
  readonly rawPath?: unknown;
}

/** Every "METHOD path" in the app's router table, found by walking Express's router stack. */
export function routeTable(app: Express): string[] {
  const found: string[] = [];
  const walk = (stack: readonly RouterLayer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const method of Object.keys(layer.route.methods)) found.push(`${method.toUpperCase()} ${prefix}${layer.route.path}`);
      } else if (layer.handle?.stack) {
        walk(layer.handle.stack, prefix + (layer.slash || typeof layer.rawPath !== 'string' ? '' : layer.rawPath));
      }
    }
  };
  walk((app as unknown as { router: { stack: RouterLayer[] } }).router.stack, '');
  return found;
}
