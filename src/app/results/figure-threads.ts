import { ErrorHandler, Injectable, computed, inject, signal } from '@angular/core';
import type { Annotation, AnnotationSeverity, ResultFigure } from '../../../shared/api/annotations.js';
import type { ProjectRole } from '../../../shared/api/projects.js';
import { ANNOTATOR_ROLES } from '../../../shared/api/reviews.js';
import { SessionStore } from '../auth/session-store';
import { ReviewDesk } from '../review/review-desk';

interface Place {
  readonly projectId: string;
  readonly modelId: string;
  /** The issued revision solved; null for a draft solve, whose figures take no comments. */
  readonly revision: number | null;
  readonly solveId: string;
}

/**
 * The review threads pinned to the figures of one results page: those of the solved revision, carried
 * forward from earlier ones, with the outdated marks the server gives for that revision. Leads, engineers
 * and reviewers write, reply, resolve and re-open; viewers (and site admins outside the project) read.
 * One per results page (provided by ResultsPage).
 */
@Injectable()
export class FigureThreads {
  private readonly desk = inject(ReviewDesk);
  private readonly session = inject(SessionStore);
  private readonly errorHandler = inject(ErrorHandler);

  private readonly place = signal<Place | null>(null);
  private readonly list = signal<readonly Annotation[]>([]);
  private readonly role = signal<ProjectRole | null>(null);
  private readonly working = signal(false);
  private readonly shownFigure = signal<ResultFigure | null>(null);

  readonly revision = computed(() => this.place()?.revision ?? null);
  readonly busy = this.working.asReadonly();
  /** The figure whose threads are unfolded; one at a time. */
  readonly opened = this.shownFigure.asReadonly();
  readonly canAnnotate = computed(() => this.revision() !== null && this.role() !== null && ANNOTATOR_ROLES.includes(this.role()!));
  /** The result-figure threads by figure, in the order the server lists them (oldest first). */
  readonly byFigure = computed(() => {
    const figures = new Map<string, Annotation[]>();
    for (const thread of this.list()) {
      if (thread.target.kind !== 'result' || thread.target.itemId === null) continue;
      figures.set(thread.target.itemId, [...(figures.get(thread.target.itemId) ?? []), thread]);
    }
    return figures;
  });
  readonly openCount = computed(() => [...this.byFigure().values()].flat().filter((thread) => thread.status === 'open').length);
  readonly total = computed(() => [...this.byFigure().values()].flat().length);

  /** Reads the threads of the solved revision and the user's role; a draft solve has none. */
  async load(projectId: string, modelId: string, revision: number | null, solveId: string): Promise<void> {
    this.place.set({ projectId, modelId, revision, solveId });
    this.list.set([]);
    if (revision === null) return;
    try {
      const [members, list] = await Promise.all([this.desk.members(projectId), this.desk.annotations(projectId, modelId, { revision })]);
      const me = this.session.user()?.id;
      this.role.set(members.find((member) => member.userId === me)?.role ?? null);
      this.list.set(list.annotations);
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  toggle(figure: ResultFigure): void {
    this.shownFigure.set(this.shownFigure() === figure ? null : figure);
  }

  open(figure: ResultFigure): void {
    this.shownFigure.set(figure);
  }

  /** A new thread on the figure, as seen in this solve. True when it was stored. */
  add(figure: ResultFigure, severity: AnnotationSeverity, body: string): Promise<boolean> {
    return this.write((place) => this.desk.annotate(place.projectId, place.modelId, place.revision!, { kind: 'result', itemId: figure }, severity, body, place.solveId));
  }

  reply(thread: Annotation, body: string): Promise<boolean> {
    return this.write((place) => this.desk.reply(place.projectId, thread.id, body));
  }

  setResolved(thread: Annotation, resolved: boolean): Promise<boolean> {
    return this.write((place) => this.desk.setResolved(place.projectId, thread.id, resolved));
  }

  /** Runs one write, then reads the list again, so the outdated marks stay those of this page's revision. */
  private async write(work: (place: Place) => Promise<unknown>): Promise<boolean> {
    const place = this.place();
    if (!place || place.revision === null) return false;
    this.working.set(true);
    try {
      await work(place);
      const list = await this.desk.annotations(place.projectId, place.modelId, { revision: place.revision });
      if (this.place() === place) this.list.set(list.annotations);
      return true;
    } catch (error) {
      this.errorHandler.handleError(error);
      return false;
    } finally {
      this.working.set(false);
    }
  }
}
