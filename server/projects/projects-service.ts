import type { z } from 'zod';
import type { Project, createProjectBody, updateProjectBody } from '../../shared/api/projects.js';
import type { SessionUser } from '../auth/session-user.js';
import type { Database } from '../db/client.js';
import { loadProjectAccess, requireAction, requireActiveProject } from './project-access.js';
import { ProjectsRepository, toProject } from './projects-repository.js';

type CreateProject = z.output<typeof createProjectBody>;
type UpdateProject = z.output<typeof updateProjectBody>;

/** Project rules: anyone signed in creates a project and leads it; leads and admins change and archive it. */
export class ProjectsService {
  private readonly projects: ProjectsRepository;

  constructor(
    private readonly db: Database,
    private readonly user: SessionUser,
  ) {
    this.projects = new ProjectsRepository(db, user);
  }

  async list(includeArchived: boolean): Promise<Project[]> {
    const found = await this.projects.list(includeArchived);
    return found.map(({ row, myRole }) => toProject(row, myRole));
  }

  async get(projectId: string): Promise<Project> {
    const access = await loadProjectAccess(this.db, this.user, projectId);
    return toProject(access.project, access.role);
  }

  async create(body: CreateProject): Promise<Project> {
    const created = await this.projects.createAsLead(body);
    return toProject(created.row, created.myRole);
  }

  async update(projectId: string, body: UpdateProject): Promise<Project> {
    const access = await loadProjectAccess(this.db, this.user, projectId);
    requireAction(access, 'project.edit', 'change the project details');
    requireActiveProject(access);
    return toProject(await this.projects.update(projectId, body), access.role);
  }

  async setArchived(projectId: string, archived: boolean): Promise<Project> {
    const access = await loadProjectAccess(this.db, this.user, projectId);
    requireAction(access, 'project.archive', archived ? 'archive the project' : 'restore the project');
    return toProject(await this.projects.update(projectId, { archived }), access.role);
  }
}
