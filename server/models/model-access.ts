import { and, eq } from 'drizzle-orm';
import type { ProjectRole } from '../../shared/api/projects.js';
import { canEditModels } from '../../shared/api/models.js';
import type { Database } from '../db/client.js';
import { projectMembers, projects } from '../db/schema/projects.js';
import { apiErrors } from '../errors.js';
import type { SessionUser } from '../auth/session-user.js';

export interface ProjectAccess {
  readonly projectId: string;
  /** null for a site admin who is not a member. */
  readonly role: ProjectRole | null;
  readonly projectArchived: boolean;
}

/**
 * The caller's access to a project: members of any role and site admins read; anyone else gets the same
 * 404 as for a project that does not exist, so ids of other teams' projects reveal nothing.
 */
export async function projectAccess(db: Database, user: SessionUser, projectId: string): Promise<ProjectAccess> {
  const [row] = await db
    .select({ archived: projects.archived, role: projectMembers.role })
    .from(projects)
    .leftJoin(projectMembers, and(eq(projectMembers.projectId, projects.id), eq(projectMembers.userId, user.id)))
    .where(eq(projects.id, projectId));
  if (!row || (row.role === null && !user.isAdmin)) throw apiErrors.notFound('no such project');
  return { projectId, role: row.role, projectArchived: row.archived };
}

/** Throws 403 unless the caller may change models and start solves here, 409 when the project is archived. */
export function requireModelEditor(access: ProjectAccess, what: string): void {
  if (!canEditModels(access.role)) {
    throw apiErrors.forbidden(`only a lead or engineer of this project may ${what}; your role is ${access.role ?? 'none (site admin)'}`);
  }
  if (access.projectArchived) throw apiErrors.conflict(`the project is archived; restore it before you ${what}`);
}
