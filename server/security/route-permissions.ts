import type { Express, Router } from 'express';
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
/**
 * server/security/permission-guard.ts enforces these before the body is read, so a caller without the
 * right gets 401 / 403 / 404 whatever they send; the services check the finer rules (authors, archived
 * records, frozen SIFs) again. `doing` completes the 403 message "you may not ...".
 */
export type RoutePermission =
  | { readonly kind: 'public' }
  | { readonly kind: 'signed-in' }
  | { readonly kind: 'admin'; readonly doing: string }
  | { readonly kind: 'project'; readonly actions: readonly ProjectAction[]; readonly doing: string }
  | { readonly kind: 'device-reader' }
  | { readonly kind: 'device-editor'; readonly doing: string }
  | { readonly kind: 'review-decider'; readonly doing: string }
  | { readonly kind: 'annotator'; readonly doing: string };

const PUBLIC: RoutePermission = { kind: 'public' };
const SIGNED_IN: RoutePermission = { kind: 'signed-in' };
const adminOnly = (doing: string): RoutePermission => ({ kind: 'admin', doing });
const DEVICE_READER: RoutePermission = { kind: 'device-reader' };
const deviceEditor = (doing: string): RoutePermission => ({ kind: 'device-editor', doing });
const annotator = (doing: string): RoutePermission => ({ kind: 'annotator', doing });
/** A project member (or admin) whose role allows any one of the actions; others 403, non-members 404. */
const project = (action: ProjectAction | readonly ProjectAction[], doing = 'read this project'): RoutePermission => ({
  kind: 'project',
  actions: typeof action === 'string' ? [action] : action,
  doing,
});

/** Every route of the app, "METHOD path" as Express holds it, with its permission. */
export const ROUTE_PERMISSIONS: Readonly<Record<string, RoutePermission>> = {
  'GET /api/health': PUBLIC,
  'POST /api/auth/sign-in': PUBLIC,
  'POST /api/auth/sign-out': PUBLIC,
  'GET /api/auth/me': SIGNED_IN,
  'POST /api/auth/password': SIGNED_IN,
  'GET /api/users': SIGNED_IN,
  'POST /api/users': adminOnly('manage user accounts'),
  'PATCH /api/users/:userId': adminOnly('manage user accounts'),
  'GET /api/projects': SIGNED_IN,
  'POST /api/projects': SIGNED_IN,
  'GET /api/projects/:projectId': project('project.read'),
  'PATCH /api/projects/:projectId': project('project.edit', 'change the project details'),
  'POST /api/projects/:projectId/archive': project('project.archive', 'archive or restore the project'),
  'GET /api/projects/:projectId/members': project('project.read'),
  'PUT /api/projects/:projectId/members/:userId': project('members.manage', 'manage members'),
  'DELETE /api/projects/:projectId/members/:userId': project('members.manage', 'manage members'),
  'GET /api/projects/:projectId/sifs': project('project.read'),
  'POST /api/projects/:projectId/sifs': project('sif.create', 'create SIFs'),
  'GET /api/projects/:projectId/sifs/:sifId': project('project.read'),
  // Reviewers change only the status (sifs-service.ts checks which change each role may make).
  'PATCH /api/projects/:projectId/sifs/:sifId': project(['sif.edit', 'sif.review'], 'change SIFs'),
  'POST /api/projects/:projectId/sifs/:sifId/archive': project('sif.archive', 'archive or restore SIFs'),
  'GET /api/projects/:projectId/sifs/:sifId/models': project('project.read'),
  'POST /api/projects/:projectId/sifs/:sifId/models': project('sif.edit', 'create a model'),
  'GET /api/projects/:projectId/models/:modelId': project('project.read'),
  'PUT /api/projects/:projectId/models/:modelId/draft': project('sif.edit', 'save a model draft'),
  'POST /api/projects/:projectId/models/:modelId/import': project('sif.edit', 'save a model draft'),
  'GET /api/projects/:projectId/models/:modelId/export': project('project.read'),
  'GET /api/projects/:projectId/models/:modelId/revisions': project('project.read'),
  'POST /api/projects/:projectId/models/:modelId/revisions': project('sif.edit', 'issue a revision'),
  'GET /api/projects/:projectId/models/:modelId/revisions/:number': project('project.read'),
  'GET /api/devices/access': SIGNED_IN,
  'GET /api/devices': DEVICE_READER,
  'POST /api/devices': deviceEditor('add records to the device library'),
  'GET /api/devices/export': DEVICE_READER,
  'POST /api/devices/import/preview': deviceEditor('import into the device library'),
  'POST /api/devices/import/confirm': deviceEditor('import into the device library'),
  'GET /api/devices/:deviceId': DEVICE_READER,
  'PUT /api/devices/:deviceId': deviceEditor('edit the device library'),
  'DELETE /api/devices/:deviceId': deviceEditor('delete device records'),
  'POST /api/devices/:deviceId/archive': deviceEditor('archive device records'),
  'POST /api/devices/:deviceId/restore': deviceEditor('restore device records'),
  'GET /api/devices/:deviceId/usage': DEVICE_READER,
  'GET /api/devices/:deviceId/versions': DEVICE_READER,
  'GET /api/devices/:deviceId/versions/:version': DEVICE_READER,
  'POST /api/devices/:deviceId/evidence': deviceEditor('attach evidence to device records'),
  'GET /api/devices/:deviceId/evidence/:evidenceId': DEVICE_READER,
  'DELETE /api/devices/:deviceId/evidence/:evidenceId': deviceEditor('remove evidence from device records'),
  'POST /api/projects/:projectId/models/:modelId/solves': project('sif.edit', 'start a solve'),
  'GET /api/projects/:projectId/models/:modelId/solves': project('project.read'),
  'GET /api/projects/:projectId/solves/:solveId': project('project.read'),
  'POST /api/projects/:projectId/solves/:solveId/cancel': project('sif.edit', 'cancel a solve'),
  'GET /api/projects/:projectId/solves/:solveId/events': project('project.read'),
  'GET /api/projects/:projectId/solves/:solveId/analysis': project('project.read'),
  'GET /api/projects/:projectId/solves/:solveId/report': project('project.read'),
  'GET /api/projects/:projectId/solves/:solveId/csv': project('project.read'),
  'GET /api/reviews/queue': SIGNED_IN,
  'POST /api/projects/:projectId/models/:modelId/reviews': project('sif.edit', 'request a review'),
  'GET /api/projects/:projectId/models/:modelId/diff': project('project.read'),
  'GET /api/projects/:projectId/sifs/:sifId/reviews': project('project.read'),
  'GET /api/projects/:projectId/reviews/:roundId': project('project.read'),
  'POST /api/projects/:projectId/reviews/:roundId/approve': { kind: 'review-decider', doing: 'approve a revision' },
  'POST /api/projects/:projectId/reviews/:roundId/return': { kind: 'review-decider', doing: 'return a revision' },
  'GET /api/projects/:projectId/models/:modelId/annotations': project('project.read'),
  'POST /api/projects/:projectId/models/:modelId/annotations': annotator('annotate a model'),
  'POST /api/projects/:projectId/annotations/:annotationId/replies': annotator('reply to an annotation'),
  'POST /api/projects/:projectId/annotations/:annotationId/resolve': annotator('resolve an annotation'),
  'POST /api/projects/:projectId/annotations/:annotationId/reopen': annotator('re-open an annotation'),
  'GET /api/projects/:projectId/audit': project('project.read'),
  'GET /api/projects/:projectId/audit/csv': project('project.read'),
  'GET /api/admin/mail': adminOnly('read the sent mail'),
  'GET /api/me/notices': SIGNED_IN,
  'PUT /api/me/notices': SIGNED_IN,
  // The built Angular client and its files.
  'GET /{*splat}': PUBLIC,
};

/** Marks a router routeTable does not list (the permission guard repeats every route of the app). */
export const NOT_IN_ROUTE_TABLE = Symbol('not in the route table');

interface RouterLayer {
  readonly route?: { readonly path: string; readonly methods: Record<string, boolean> };
  readonly handle?: { readonly stack?: readonly RouterLayer[]; readonly [NOT_IN_ROUTE_TABLE]?: true };
  readonly slash?: boolean;
  readonly rawPath?: unknown;
}

/** Every "METHOD path" in the app's router table in the order Express tries them, found by walking its router stack. */
export function routeTable(app: Express): string[] {
  return routesOf((app as unknown as { router: { stack: RouterLayer[] } }).router.stack, '');
}

/** The same for a router mounted at `prefix` (app.ts builds the permission guard from the API router). */
export function routerRoutes(router: Router, prefix: string): string[] {
  return routesOf((router as unknown as { stack: RouterLayer[] }).stack, prefix);
}

function routesOf(stack: readonly RouterLayer[], prefix: string): string[] {
  const found: string[] = [];
  const walk = (layers: readonly RouterLayer[], at: string) => {
    for (const layer of layers) {
      if (layer.route) {
        for (const method of Object.keys(layer.route.methods)) found.push(`${method.toUpperCase()} ${at}${layer.route.path}`);
      } else if (layer.handle?.stack && !layer.handle[NOT_IN_ROUTE_TABLE]) {
        walk(layer.handle.stack, at + (layer.slash || typeof layer.rawPath !== 'string' ? '' : layer.rawPath));
      }
    }
  };
  walk(stack, prefix);
  return found;
}
