import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import {
  modelDetail,
  modelDraft,
  modelList,
  modelRevisionDetail,
  type DraftContent,
  type ModelDetail,
  type ModelDraft,
  type ModelList,
  type ModelRevisionDetail,
} from '../../../shared/api/models.js';
import { solve, type Solve, type StartSolveBody } from '../../../shared/api/solves.js';
import { parsed } from '../http/parse-response';

/** Reads and writes the models of a SIF, their drafts and revisions, and starts solves; replies are checked. */
@Injectable({ providedIn: 'root' })
export class ModelRecords {
  private readonly http = inject(HttpClient);

  list(projectId: string, sifId: string): Promise<ModelList> {
    const url = `${project(projectId)}/sifs/${encodeURIComponent(sifId)}/models`;
    return parsed(`GET ${url}`, this.http.get(url), modelList);
  }

  /** Creates a model from a valid model file (400 with the issues by path otherwise). */
  create(projectId: string, sifId: string, file: unknown): Promise<ModelDetail> {
    const url = `${project(projectId)}/sifs/${encodeURIComponent(sifId)}/models`;
    return parsed(`POST ${url}`, this.http.post(url, { file }), modelDetail);
  }

  get(projectId: string, modelId: string): Promise<ModelDetail> {
    const url = modelUrl(projectId, modelId);
    return parsed(`GET ${url}`, this.http.get(url), modelDetail);
  }

  /** Fails with a 409 version_conflict ApiError whose details hold the stored draft when `version` is stale. */
  saveDraft(projectId: string, modelId: string, version: number, content: DraftContent): Promise<ModelDraft> {
    const url = `${modelUrl(projectId, modelId)}/draft`;
    return parsed(`PUT ${url}`, this.http.put(url, { version, content }), modelDraft);
  }

  importFile(projectId: string, modelId: string, version: number, file: unknown): Promise<ModelDraft> {
    const url = `${modelUrl(projectId, modelId)}/import`;
    return parsed(`POST ${url}`, this.http.post(url, { version, file }), modelDraft);
  }

  /** The draft as a model file, as the server writes it for download. */
  exportFile(projectId: string, modelId: string): Promise<Blob> {
    const url = `${modelUrl(projectId, modelId)}/export`;
    return new Promise((resolve, reject) => this.http.get(url, { responseType: 'blob' }).subscribe({ next: resolve, error: reject }));
  }

  issueRevision(projectId: string, modelId: string, draftVersion: number, reason: string): Promise<ModelRevisionDetail> {
    const url = `${modelUrl(projectId, modelId)}/revisions`;
    return parsed(`POST ${url}`, this.http.post(url, { draftVersion, reason }), modelRevisionDetail);
  }

  startSolve(projectId: string, modelId: string, body: StartSolveBody): Promise<Solve> {
    const url = `${modelUrl(projectId, modelId)}/solves`;
    return parsed(`POST ${url}`, this.http.post(url, body), solve);
  }

  cancelSolve(projectId: string, solveId: string): Promise<Solve> {
    const url = `${project(projectId)}/solves/${encodeURIComponent(solveId)}/cancel`;
    return parsed(`POST ${url}`, this.http.post(url, {}), solve);
  }
}

function project(projectId: string): string {
  return `/api/projects/${encodeURIComponent(projectId)}`;
}

function modelUrl(projectId: string, modelId: string): string {
  return `${project(projectId)}/models/${encodeURIComponent(modelId)}`;
}

/** Where the solve's server-sent events stream. */
export function solveEventsUrl(projectId: string, solveId: string): string {
  return `${project(projectId)}/solves/${encodeURIComponent(solveId)}/events`;
}
