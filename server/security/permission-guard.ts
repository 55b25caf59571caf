import { Router, type Request, type RequestHandler } from 'express';
import { recordId } from '../../shared/api/common.js';
import { canEditDevices } from '../../shared/api/devices.js';
import { canDo } from '../../shared/api/permissions.js';
import { ANNOTATOR_ROLES, REVIEWER_ROLES } from '../../shared/api/reviews.js';
import type { ProjectRole } from '../../shared/api/projects.js';
import { requireUser } from '../auth/session-user.js';
import type { Database } from '../db/client.js';
import { deviceRepository } from '../devices/device-repository.js';
import { apiErrors } from '../errors.js';
import { loadProjectAccess, roleForbids } from '../projects/project-access.js';
import { NOT_IN_ROUTE_TABLE, ROUTE_PERMISSIONS, routerRoutes, type RoutePermission } from './route-permissions.js';

export interface PermissionGuard {
  /** Mount before the body parsers and the resource routers. */
  readonly router: Router;
  /**
   * Repeats every route of `api` (mounted at `prefix`), in the order Express tries them, with its permission
   * from route-permissions.ts. Call once after every resource router is mounted; a route without an entry
   * there throws, so the server does not start with an unguarded route.
   */
  cover(api: Router, prefix: string): void;
}

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';
const METHODS: readonly string[] = ['get', 'post', 'put', 'patch', 'delete'];

/**
 * The permission of every API route, checked from the session before the body is parsed or validated:
 * an anonymous caller gets 401, a signed-in one without the right 403, and one who may not see the project
 * (or the device library) 404, whatever the body holds. The first guard route that matches decides, as the
 * first matching route of the app answers, and then the request leaves the guard (`next('router')`) for the
 * body parsers and the resource routers. The services keep their own checks (authors, archived records),
 * so the guard only refuses earlier, never allows more.
 */
export function createPermissionGuard(db: Database): PermissionGuard {
  const router = Router();
  Object.assign(router, { [NOT_IN_ROUTE_TABLE]: true });
  const devices = deviceRepository(db);
  let covered = false;

  async function projectRole(req: Request, permission: RoutePermission & { doing: string }, allowed: (role: ProjectRole | null, isAdmin: boolean) => boolean) {
    const user = requireUser(req);
    const projectId = req.params['projectId'];
    // A malformed id is left to the route, which names the parameter at fault (400); nothing exists there.
    if (typeof projectId !== 'string' || !recordId.safeParse(projectId).success) return;
    const access = await loadProjectAccess(db, user, projectId);
    if (!allowed(access.role, user.isAdmin)) throw roleForbids(access, permission.doing);
  }

  async function check(permission: RoutePermission, req: Request): Promise<void> {
    if (permission.kind === 'public') return;
    const user = requireUser(req);
    switch (permission.kind) {
      case 'signed-in':
        return;
      case 'admin':
        if (!user.isAdmin) throw apiErrors.forbidden(`only a site admin may ${permission.doing}`);
        return;
      case 'project':
        return projectRole(req, permission, (role, isAdmin) => permission.actions.some((action) => canDo(role, isAdmin, action)));
      case 'review-decider':
        return projectRole(req, permission, (role) => role !== null && REVIEWER_ROLES.includes(role));
      case 'annotator':
        return projectRole(req, permission, (role) => role !== null && ANNOTATOR_ROLES.includes(role));
      case 'device-reader':
      case 'device-editor': {
        if (user.isAdmin) return;
        if (!(await devices.isMemberAnywhere(user.id))) throw apiErrors.notFound('the device library is open to project members only');
        if (permission.kind === 'device-editor' && !canEditDevices(await devices.activeRolesOf(user.id), false)) {
          throw apiErrors.forbidden(`only leads and engineers of an active project (or site admins) may ${permission.doing}`);
        }
        return;
      }
    }
  }

  const guard = (permission: RoutePermission): RequestHandler => async (req, _res, next) => {
    try {
      await check(permission, req);
    } catch (error) {
      next(error);
      return;
    }
    next('router');
  };

  return {
    router,
    cover(api, prefix) {
      if (covered) throw new Error('the permission guard already covers the API');
      covered = true;
      for (const route of routerRoutes(api, prefix)) {
        const permission = ROUTE_PERMISSIONS[route];
        if (!permission) throw new Error(`${route} has no permission in server/security/route-permissions.ts`);
        const [method, path] = route.split(' ') as [string, string];
        if (!METHODS.includes(method.toLowerCase())) throw new Error(`${route}: the permission guard does not know this method`);
        const needsProject = permission.kind === 'project' || permission.kind === 'review-decider' || permission.kind === 'annotator';
        if (needsProject && !path.includes('/:projectId')) throw new Error(`${route} is declared project-scoped but has no :projectId`);
        router[method.toLowerCase() as Method](path.slice(prefix.length), guard(permission));
      }
    },
  };
}
