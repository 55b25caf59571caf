import { HttpClient } from '@angular/common/http';
import { Injectable, inject, signal } from '@angular/core';
import { project, projectList, type CreateProjectBody, type Project } from '../../../shared/api/projects.js';
import { parsed } from '../http/parse-response';

/** The projects the signed-in user may see, and the changes made to them. */
@Injectable({ providedIn: 'root' })
export class ProjectCatalog {
  private readonly http = inject(HttpClient);
  private readonly listed = signal<readonly Project[]>([]);
  private readonly loadingList = signal(false);

  readonly projects = this.listed.asReadonly();
  readonly loading = this.loadingList.asReadonly();

  async load(includeArchived: boolean): Promise<void> {
    this.loadingList.set(true);
    try {
      const params = { includeArchived: String(includeArchived) };
      this.listed.set(await parsed('GET /api/projects', this.http.get('/api/projects', { params }), projectList));
    } finally {
      this.loadingList.set(false);
    }
  }

  get(projectId: string): Promise<Project> {
    return parsed(`GET /api/projects/${projectId}`, this.http.get(`/api/projects/${encodeURIComponent(projectId)}`), project);
  }

  async create(body: CreateProjectBody): Promise<Project> {
    const created = await parsed('POST /api/projects', this.http.post('/api/projects', body), project);
    this.listed.update((projects) => [...projects, created].sort((a, b) => a.name.localeCompare(b.name)));
    return created;
  }

  async setArchived(projectId: string, archived: boolean): Promise<Project> {
    const updated = await parsed(
      `POST /api/projects/${projectId}/archive`,
      this.http.post(`/api/projects/${encodeURIComponent(projectId)}/archive`, { archived }),
      project,
    );
    this.replace(updated);
    return updated;
  }

  private replace(updated: Project): void {
    this.listed.update((projects) => projects.map((candidate) => (candidate.id === updated.id ? updated : candidate)));
  }
}
