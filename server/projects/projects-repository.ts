import { and, asc, eq, isNotNull, type SQL } from 'drizzle-orm';
import type { Project, ProjectRole } from '../../shared/api/projects.js';
import type { SessionUser } from '../auth/session-user.js';
import type { Database } from '../db/client.js';
import { projectMembers, projects, type NewProjectRow, type ProjectRow } from '../db/schema/projects.js';

export function toProject(row: ProjectRow, myRole: ProjectRole | null): Project {
  return {
    id: row.id,
    name: row.name,
    description: row.description,
    site: row.site,
    unit: row.unit,
    client: row.client,
    archived: row.archived,
    myRole,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

export interface VisibleProject {
  readonly row: ProjectRow;
  readonly myRole: ProjectRole | null;
}

type ProjectFields = Partial<Pick<NewProjectRow, 'name' | 'description' | 'site' | 'unit' | 'client' | 'archived'>>;

/** Projects as one user sees them: the ones they are a member of, or every project for a site admin. */
export class ProjectsRepository {
  constructor(
    private readonly db: Database,
    private readonly user: SessionUser,
  ) {}

  private visible(...conditions: (SQL | undefined)[]) {
    return this.db
      .select({ row: projects, myRole: projectMembers.role })
      .from(projects)
      .leftJoin(projectMembers, and(eq(projectMembers.projectId, projects.id), eq(projectMembers.userId, this.user.id)))
      .where(and(this.user.isAdmin ? undefined : isNotNull(projectMembers.role), ...conditions));
  }

  async list(includeArchived: boolean): Promise<VisibleProject[]> {
    const rows = await this.visible(includeArchived ? undefined : eq(projects.archived, false)).orderBy(asc(projects.name), asc(projects.id));
    return rows.map(({ row, myRole }) => ({ row, myRole: myRole ?? null }));
  }

  async find(projectId: string): Promise<VisibleProject | null> {
    const [found] = await this.visible(eq(projects.id, projectId));
    return found ? { row: found.row, myRole: found.myRole ?? null } : null;
  }

  /** Creates the project with the user as its lead, in one transaction. */
  async createAsLead(values: NewProjectRow): Promise<VisibleProject> {
    return this.db.transaction(async (tx) => {
      const [row] = await tx.insert(projects).values(values).returning();
      await tx.insert(projectMembers).values({ projectId: row.id, userId: this.user.id, role: 'lead' });
      return { row, myRole: 'lead' as const };
    });
  }

  /** Updates a project already checked visible by `find`. */
  async update(projectId: string, values: ProjectFields): Promise<ProjectRow> {
    const [row] = await this.db.update(projects).set(values).where(eq(projects.id, projectId)).returning();
    return row;
  }
}
