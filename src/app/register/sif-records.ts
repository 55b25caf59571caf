import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { sif, sifPage, type CreateSifBody, type Sif, type SifListQuery, type SifPage, type UpdateSifBody } from '../../../shared/api/sifs.js';
import { parsed } from '../http/parse-response';

/** Reads and writes the SIF records of a project; every reply is checked against the shared schema. */
@Injectable({ providedIn: 'root' })
export class SifRecords {
  private readonly http = inject(HttpClient);

  list(projectId: string, query: SifListQuery): Promise<SifPage> {
    const params: Record<string, string> = {};
    for (const [key, value] of Object.entries(query)) {
      if (value !== undefined && value !== '') params[key] = String(value);
    }
    return parsed(`GET ${this.base(projectId)}`, this.http.get(this.base(projectId), { params }), sifPage);
  }

  get(projectId: string, sifId: string): Promise<Sif> {
    const url = `${this.base(projectId)}/${encodeURIComponent(sifId)}`;
    return parsed(`GET ${url}`, this.http.get(url), sif);
  }

  create(projectId: string, body: CreateSifBody): Promise<Sif> {
    return parsed(`POST ${this.base(projectId)}`, this.http.post(this.base(projectId), body), sif);
  }

  /** Fails with a 409 version_conflict ApiError whose details hold the stored record when `version` is stale. */
  update(projectId: string, sifId: string, body: UpdateSifBody): Promise<Sif> {
    const url = `${this.base(projectId)}/${encodeURIComponent(sifId)}`;
    return parsed(`PATCH ${url}`, this.http.patch(url, body), sif);
  }

  setArchived(projectId: string, sifId: string, archived: boolean): Promise<Sif> {
    const url = `${this.base(projectId)}/${encodeURIComponent(sifId)}/archive`;
    return parsed(`POST ${url}`, this.http.post(url, { archived }), sif);
  }

  private base(projectId: string): string {
    return `/api/projects/${encodeURIComponent(projectId)}/sifs`;
  }
}
