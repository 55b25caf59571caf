import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { annotation, annotationList, type AnnotationList, type AnnotationSeverity, type AnnotationStatus, type AnnotationTarget } from '../../../shared/api/annotations.js';
import { auditList, noticeSettings, sentMailList } from '../../../shared/api/audit.js';
import { memberList } from '../../../shared/api/projects.js';
import { modelRevisionDetail, modelRevisionList } from '../../../shared/api/models.js';
import { reviewRound, reviewRoundList, revisionDiff } from '../../../shared/api/reviews.js';
import { solveList } from '../../../shared/api/solves.js';
import { parsed } from '../http/parse-response';

/** The review API: rounds, annotation threads, revision diffs, the audit trail and mail notices. */
@Injectable({ providedIn: 'root' })
export class ReviewDesk {
  private readonly http = inject(HttpClient);

  queue() {
    return parsed('the review queue', this.http.get('/api/reviews/queue'), reviewRoundList);
  }

  roundsOfSif(projectId: string, sifId: string) {
    return parsed('the review rounds', this.http.get(`/api/projects/${projectId}/sifs/${sifId}/reviews`), reviewRoundList);
  }

  requestReview(projectId: string, modelId: string, revision: number, reviewerIds: readonly string[], message: string) {
    return parsed('the review request', this.http.post(`/api/projects/${projectId}/models/${modelId}/reviews`, { revision, reviewerIds, message }), reviewRound);
  }

  approve(projectId: string, roundId: string, comment: string) {
    return parsed('the approval', this.http.post(`/api/projects/${projectId}/reviews/${roundId}/approve`, { comment }), reviewRound);
  }

  returnRound(projectId: string, roundId: string, comment: string) {
    return parsed('the return', this.http.post(`/api/projects/${projectId}/reviews/${roundId}/return`, { comment }), reviewRound);
  }

  members(projectId: string) {
    return parsed('the members', this.http.get(`/api/projects/${projectId}/members`), memberList);
  }

  revisions(projectId: string, modelId: string) {
    return parsed('the revisions', this.http.get(`/api/projects/${projectId}/models/${modelId}/revisions`), modelRevisionList);
  }

  revision(projectId: string, modelId: string, number: number) {
    return parsed('the revision', this.http.get(`/api/projects/${projectId}/models/${modelId}/revisions/${number}`), modelRevisionDetail);
  }

  diff(projectId: string, modelId: string, from: number, to: number) {
    return parsed('the revision diff', this.http.get(`/api/projects/${projectId}/models/${modelId}/diff`, { params: { from, to } }), revisionDiff);
  }

  /** The threads as they stand on a revision (default: the latest issued one), filtered. */
  annotations(projectId: string, modelId: string, filter: { revision?: number; status?: AnnotationStatus; severity?: AnnotationSeverity }): Promise<AnnotationList> {
    const params: Record<string, string> = {};
    if (filter.revision !== undefined) params['revision'] = String(filter.revision);
    if (filter.status) params['status'] = filter.status;
    if (filter.severity) params['severity'] = filter.severity;
    return parsed('the annotations', this.http.get(`/api/projects/${projectId}/models/${modelId}/annotations`, { params }), annotationList);
  }

  /** A new thread; on a result figure, solveId names the solve whose figure the annotator looked at. */
  annotate(projectId: string, modelId: string, revision: number, target: AnnotationTarget, severity: AnnotationSeverity, body: string, solveId?: string) {
    const request = solveId === undefined ? { revision, target, severity, body } : { revision, target, severity, body, solveId };
    return parsed('the new annotation', this.http.post(`/api/projects/${projectId}/models/${modelId}/annotations`, request), annotation);
  }

  /** The latest succeeded solve of an issued revision, to open its results page; null when there is none. */
  async latestSolveOf(projectId: string, modelId: string, revision: number): Promise<string | null> {
    const list = await parsed('the solves', this.http.get(`/api/projects/${projectId}/models/${modelId}/solves`, { params: { revision, status: 'succeeded' } }), solveList);
    // The list holds every solve of the revision's content, drafts of the same content too: figure threads live on revisions.
    return list.find((entry) => entry.revisionNumber === revision)?.id ?? null;
  }

  reply(projectId: string, annotationId: string, body: string) {
    return parsed('the reply', this.http.post(`/api/projects/${projectId}/annotations/${annotationId}/replies`, { body }), annotation);
  }

  setResolved(projectId: string, annotationId: string, resolved: boolean) {
    return parsed('the annotation', this.http.post(`/api/projects/${projectId}/annotations/${annotationId}/${resolved ? 'resolve' : 'reopen'}`, {}), annotation);
  }

  audit(projectId: string, sifId: string | null) {
    return parsed('the audit trail', this.http.get(`/api/projects/${projectId}/audit`, { params: sifId ? { sifId } : {} }), auditList);
  }

  sentMail() {
    return parsed('the sent mail', this.http.get('/api/admin/mail'), sentMailList);
  }

  notices() {
    return parsed('the notice settings', this.http.get('/api/me/notices'), noticeSettings);
  }

  setNotices(notices: boolean) {
    return parsed('the notice settings', this.http.put('/api/me/notices', { notices }), noticeSettings);
  }
}
