import { and, asc, count, eq } from 'drizzle-orm';
import type { Member, ProjectRole } from '../../shared/api/projects.js';
import type { Queryable } from '../db/client.js';
import { projectMembers, projects } from '../db/schema/projects.js';
import { users } from '../db/schema/users.js';
import type { ProjectAccess } from '../projects/project-access.js';

/** The members of one project the user may see (built from a checked ProjectAccess). */
export class MembersRepository {
  private readonly projectId: string;

  constructor(
    private readonly db: Queryable,
    access: ProjectAccess,
  ) {
    this.projectId = access.project.id;
  }

  private select() {
    return this.db
      .select({ userId: users.id, username: users.username, displayName: users.displayName, role: projectMembers.role })
      .from(projectMembers)
      .innerJoin(users, eq(users.id, projectMembers.userId));
  }

  list(): Promise<Member[]> {
    return this.select().where(eq(projectMembers.projectId, this.projectId)).orderBy(asc(users.username));
  }

  async find(userId: string): Promise<Member | null> {
    const [member] = await this.select().where(and(eq(projectMembers.projectId, this.projectId), eq(projectMembers.userId, userId)));
    return member ?? null;
  }

  /** Locks the project row until the transaction ends, so two membership changes cannot both drop the last lead. */
  async lockProject(): Promise<void> {
    await this.db.select({ id: projects.id }).from(projects).where(eq(projects.id, this.projectId)).for('update');
  }

  async upsert(userId: string, role: ProjectRole): Promise<void> {
    await this.db
      .insert(projectMembers)
      .values({ projectId: this.projectId, userId, role })
      .onConflictDoUpdate({ target: [projectMembers.projectId, projectMembers.userId], set: { role, updatedAt: new Date() } });
  }

  async remove(userId: string): Promise<void> {
    await this.db.delete(projectMembers).where(and(eq(projectMembers.projectId, this.projectId), eq(projectMembers.userId, userId)));
  }

  async countLeads(): Promise<number> {
    const [row] = await this.db
      .select({ value: count() })
      .from(projectMembers)
      .where(and(eq(projectMembers.projectId, this.projectId), eq(projectMembers.role, 'lead')));
    return row.value;
  }
}
