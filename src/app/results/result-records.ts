import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { resultAnalysis, type ResultAnalysis, type ResultTable } from '../../../shared/api/results.js';
import { solve, type Solve } from '../../../shared/api/solves.js';
import { parsed } from '../http/parse-response';

function solveUrl(projectId: string, solveId: string): string {
  return `/api/projects/${encodeURIComponent(projectId)}/solves/${encodeURIComponent(solveId)}`;
}

/** Reads a solve with its result and the analysis beside it; replies are checked with the shared schemas. */
@Injectable({ providedIn: 'root' })
export class ResultRecords {
  private readonly http = inject(HttpClient);

  solve(projectId: string, solveId: string): Promise<Solve> {
    const url = solveUrl(projectId, solveId);
    return parsed(`GET ${url}`, this.http.get(url), solve);
  }

  analysis(projectId: string, solveId: string): Promise<ResultAnalysis> {
    const url = `${solveUrl(projectId, solveId)}/analysis`;
    return parsed(`GET ${url}`, this.http.get(url), resultAnalysis);
  }

  /** The verification report (PDF, an attachment). */
  reportUrl(projectId: string, solveId: string): string {
    return `${solveUrl(projectId, solveId)}/report`;
  }

  csvUrl(projectId: string, solveId: string, table: ResultTable): string {
    return `${solveUrl(projectId, solveId)}/csv?table=${encodeURIComponent(table)}`;
  }
}
