import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, ErrorHandler, Injector, afterNextRender, computed, effect, inject, input, output, signal, untracked } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { RouterLink } from '@angular/router';
import {
  ANNOTATION_SEVERITIES,
  RESULT_FIGURES,
  RESULT_FIGURE_LABELS,
  describeAnnotationTarget,
  type Annotation,
  type AnnotationSeverity,
  type AnnotationStatus,
  type AnnotationTargetKind,
} from '../../../shared/api/annotations.js';
import type { Member } from '../../../shared/api/projects.js';
import { REVIEWER_ROLES, type ReviewRound, type RevisionDiff } from '../../../shared/api/reviews.js';
import { modelItems } from '../../../shared/model-diff.js';
import { modelFile } from '../../../shared/model-file.js';
import { SessionStore } from '../auth/session-store';
import { CanvasFocus } from '../canvas/canvas-focus';
import { ReviewDesk } from './review-desk';
import { ReviewPins } from './review-pins';

interface PinOption {
  readonly key: string;
  readonly kind: AnnotationTargetKind;
  readonly itemId: string | null;
  readonly label: string;
}

/** The id the canvas knows an item by: a transition "A->B" is shown through its source state. */
function canvasId(kind: string, itemId: string | null): string | null {
  if (itemId === null || kind === 'model' || kind === 'result') return null;
  return kind === 'transition' ? (itemId.split('->')[0] ?? null) : itemId;
}

const show = (value: unknown) => (value === undefined ? '—' : typeof value === 'string' ? value : JSON.stringify(value));

/**
 * Beside the canvas: the model's review round (request, approve, return), its annotation threads with
 * filters and replies, and the diff between two revisions; clicking a thread or a diff row outlines its
 * item on the canvas.
 */
@Component({
  selector: 'pl-review-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButton, RouterLink],
  host: { class: 'review-panel', 'aria-label': 'Review', role: 'complementary', '[class.expanded]': 'expanded()' },
  templateUrl: './review-panel.html',
  styleUrl: './review-panel.scss',
})
export class ReviewPanel {
  private readonly desk = inject(ReviewDesk);
  private readonly session = inject(SessionStore);
  private readonly focus = inject(CanvasFocus);
  private readonly pins = inject(ReviewPins);
  private readonly errorHandler = inject(ErrorHandler);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly injector = inject(Injector);

  readonly projectId = input.required<string>();
  readonly sifId = input.required<string>();
  readonly modelId = input.required<string>();
  /** Changes when the editor issues a revision, so the panel reloads. */
  readonly latestRevision = input<number | null>(null);
  readonly changed = output<void>();

  protected readonly show = show;
  protected readonly describe = describeAnnotationTarget;
  protected readonly severities = ANNOTATION_SEVERITIES;
  protected readonly members = signal<readonly Member[]>([]);
  protected readonly rounds = signal<readonly ReviewRound[]>([]);
  protected readonly threads = signal<readonly Annotation[]>([]);
  protected readonly shownRevision = signal(0);
  protected readonly pinOptions = signal<readonly PinOption[]>([]);
  protected readonly statusFilter = signal<AnnotationStatus | ''>('');
  protected readonly severityFilter = signal<AnnotationSeverity | ''>('');
  protected readonly openThread = signal<string | null>(null);
  protected readonly diff = signal<RevisionDiff | null>(null);
  protected readonly busy = signal(false);
  /** Folded to a small button over the canvas until asked for, so the drawing keeps its width. */
  protected readonly expanded = signal(false);
  protected readonly openThreads = computed(() => this.threads().filter((thread) => thread.status === 'open').length);
  protected readonly message = signal<string | null>(null);
  /** The latest succeeded solve of the shown revision, whose results page shows the result-figure threads. */
  protected readonly resultsSolveId = signal<string | null>(null);

  private readonly me = computed(() => this.session.user()?.id ?? null);
  protected readonly myRole = computed(() => this.members().find((member) => member.userId === this.me())?.role ?? null);
  protected readonly canRequest = computed(() => this.myRole() === 'lead' || this.myRole() === 'engineer');
  protected readonly canAnnotate = computed(() => this.myRole() !== null && this.myRole() !== 'viewer');
  protected readonly modelRounds = computed(() => this.rounds().filter((round) => round.modelId === this.modelId()));
  protected readonly openRound = computed(() => this.modelRounds().find((round) => round.status === 'open') ?? null);
  protected readonly canDecide = computed(() => {
    const round = this.openRound();
    return round !== null && round.reviewers.some((reviewer) => reviewer.userId === this.me()) && round.revision === this.latestRevision();
  });
  protected readonly reviewerChoices = computed(() => this.members().filter((member) => REVIEWER_ROLES.includes(member.role) && member.userId !== this.me()));

  constructor() {
    effect(() => {
      const keys = [this.projectId(), this.sifId(), this.modelId(), this.latestRevision(), this.statusFilter(), this.severityFilter()] as const;
      untracked(() => void this.reload(keys[0], keys[1], keys[2]));
    });
    // The threads shown here are the pins on the canvas (with the same filters); a click on a pin opens its thread.
    effect(() => this.pins.show(this.threads()));
    effect(() => {
      const request = this.pins.requested();
      if (request) untracked(() => this.openFromPin(request.threadId));
    });
    inject(DestroyRef).onDestroy(() => this.pins.clear());
  }

  private openFromPin(threadId: string): void {
    const thread = this.threads().find((candidate) => candidate.id === threadId);
    if (!thread) return;
    this.expanded.set(true);
    this.openThread.set(threadId);
    const id = canvasId(thread.target.kind, thread.target.itemId);
    if (id) this.focus.highlight([id]);
    afterNextRender(() => this.host.nativeElement.querySelector(`[data-thread-id="${threadId}"]`)?.scrollIntoView({ block: 'nearest' }), { injector: this.injector });
  }

  private async reload(projectId: string, sifId: string, modelId: string): Promise<void> {
    try {
      const [members, rounds, list] = await Promise.all([
        this.desk.members(projectId),
        this.desk.roundsOfSif(projectId, sifId),
        this.desk.annotations(projectId, modelId, { status: this.statusFilter() || undefined, severity: this.severityFilter() || undefined }),
      ]);
      this.members.set(members);
      this.rounds.set(rounds);
      this.threads.set(list.annotations);
      this.shownRevision.set(list.revision);
      if (list.revision > 0) {
        const revision = await this.desk.revision(projectId, modelId, list.revision);
        const file = modelFile.safeParse(revision.content);
        const options: PinOption[] = [{ key: 'model:', kind: 'model', itemId: null, label: 'The whole model' }];
        if (file.success) {
          for (const item of modelItems(file.data).values()) {
            if (item.kind !== 'model') options.push({ key: `${item.kind}:${item.id}`, kind: item.kind, itemId: item.id, label: `${item.kind} ${item.id}` });
          }
        }
        for (const figure of RESULT_FIGURES) options.push({ key: `result:${figure}`, kind: 'result', itemId: figure, label: `result figure ${RESULT_FIGURE_LABELS[figure]}` });
        this.pinOptions.set(options);
        const onFigures = list.annotations.some((thread) => thread.target.kind === 'result');
        this.resultsSolveId.set(onFigures ? await this.desk.latestSolveOf(projectId, modelId, list.revision) : null);
      }
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  private async act(work: () => Promise<unknown>, done: string): Promise<void> {
    this.busy.set(true);
    this.message.set(null);
    try {
      await work();
      this.message.set(done);
      this.changed.emit();
      await this.reload(this.projectId(), this.sifId(), this.modelId());
    } catch (error) {
      this.errorHandler.handleError(error);
    } finally {
      this.busy.set(false);
    }
  }

  protected request(form: HTMLFormElement): void {
    const data = new FormData(form);
    const reviewerIds = data.getAll('reviewer').map(String);
    const revision = this.latestRevision();
    if (revision === null) return;
    void this.act(() => this.desk.requestReview(this.projectId(), this.modelId(), revision, reviewerIds, String(data.get('message') ?? '')), 'Review requested.');
  }

  protected decide(outcome: 'approve' | 'return', comment: string): void {
    const round = this.openRound();
    if (!round) return;
    void this.act(
      () => (outcome === 'approve' ? this.desk.approve(this.projectId(), round.id, comment) : this.desk.returnRound(this.projectId(), round.id, comment)),
      outcome === 'approve' ? 'Approved.' : 'Returned with comments.',
    );
  }

  protected annotate(form: HTMLFormElement): void {
    const data = new FormData(form);
    const option = this.pinOptions().find((candidate) => candidate.key === data.get('pin'));
    if (!option) return;
    const severity = String(data.get('severity')) as AnnotationSeverity;
    void this.act(async () => {
      await this.desk.annotate(this.projectId(), this.modelId(), this.shownRevision(), { kind: option.kind, itemId: option.itemId }, severity, String(data.get('body') ?? ''));
      form.reset();
    }, 'Annotation added.');
  }

  protected reply(thread: Annotation, text: HTMLTextAreaElement): void {
    void this.act(async () => {
      await this.desk.reply(this.projectId(), thread.id, text.value);
      text.value = '';
    }, 'Reply added.');
  }

  protected setResolved(thread: Annotation, resolved: boolean): void {
    void this.act(() => this.desk.setResolved(this.projectId(), thread.id, resolved), resolved ? 'Resolved.' : 'Re-opened.');
  }

  protected select(thread: Annotation): void {
    this.openThread.set(this.openThread() === thread.id ? null : thread.id);
    const id = canvasId(thread.target.kind, thread.target.itemId);
    if (id) this.focus.highlight([id]);
  }

  /** The pins: every item with an open thread, outlined on the canvas. */
  protected showPins(): void {
    const ids = this.threads()
      .filter((thread) => thread.status === 'open')
      .map((thread) => canvasId(thread.target.kind, thread.target.itemId))
      .filter((id): id is string => id !== null);
    this.focus.highlight([...new Set(ids)]);
  }

  protected async loadDiff(from: string, to: string): Promise<void> {
    try {
      const diff = await this.desk.diff(this.projectId(), this.modelId(), Number(from), Number(to));
      this.diff.set(diff);
      this.focus.highlight(diff.items.map((item) => canvasId(item.kind, item.id)).filter((id): id is string => id !== null));
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  /** The results page that shows a result-figure thread, unfolded at its figure; null without a solve of the revision. */
  protected resultsLink(thread: Annotation): { path: string[]; figure: string } | null {
    const solveId = this.resultsSolveId();
    if (thread.target.kind !== 'result' || thread.target.itemId === null || solveId === null) return null;
    return { path: ['/projects', this.projectId(), 'sifs', this.sifId(), 'models', this.modelId(), 'results', solveId], figure: thread.target.itemId };
  }

  protected highlightItem(kind: string, id: string): void {
    const canvas = canvasId(kind, id);
    if (canvas) this.focus.highlight([canvas]);
  }

  protected revisionNumbers(): number[] {
    return Array.from({ length: this.latestRevision() ?? 0 }, (_, index) => index + 1);
  }

  protected setStatusFilter(value: string): void {
    this.statusFilter.set(value as AnnotationStatus | '');
  }

  protected setSeverityFilter(value: string): void {
    this.severityFilter.set(value as AnnotationSeverity | '');
  }
}
