import { canDo, type ProjectAction } from '../../shared/api/permissions.js';
import type { ProjectRole } from '../../shared/api/projects.js';
import type { SessionUser } from '../auth/session-user.js';
import type { Database } from '../db/client.js';
import type { ProjectRow } from '../db/schema/projects.js';
import { apiErrors } from '../errors.js';
import { ProjectsRepository } from './projects-repository.js';

/** A project the user may see, with their role in it. Every project-scoped service starts from this. */
export interface ProjectAccess {
  readonly user: SessionUser;
  readonly project: ProjectRow;
  readonly role: ProjectRole | null;
}

/** Loads the project as the user sees it; a project they may not see is a 404, as if it did not exist. */
export async function loadProjectAccess(db: Database, user: SessionUser, projectId: string): Promise<ProjectAccess> {
  const found = await new ProjectsRepository(db, user).find(projectId);
  if (!found) throw apiErrors.notFound('no project with this id');
  return { user, project: found.row, role: found.myRole };
}

export function can(access: ProjectAccess, action: ProjectAction): boolean {
  return canDo(access.role, access.user.isAdmin, action);
}

/** The 403 for an action the user's role does not allow; `doing` completes "you may not ...". */
export function roleForbids(access: ProjectAccess, doing: string) {
  const role = access.role ? `a ${access.role}` : 'a non-member';
  return apiErrors.forbidden(`as ${role} of this project you may not ${doing}`);
}

/** 403 unless the user's role allows the action. */
export function requireAction(access: ProjectAccess, action: ProjectAction, doing: string): void {
  if (!can(access, action)) throw roleForbids(access, doing);
}

/** 409 while the project is archived: its records are read-only until it is restored. */
export function requireActiveProject(access: ProjectAccess): void {
  if (access.project.archived) {
    throw apiErrors.conflict(`project "${access.project.name}" is archived; restore it before changing anything in it`);
  }
}
