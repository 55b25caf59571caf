import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { ANNOTATION_SEVERITIES, RESULT_FIGURE_LABELS, type Annotation, type AnnotationSeverity, type ResultFigure } from '../../../shared/api/annotations.js';
import { RESULT_KINDS, pinLabel, pinsOf } from '../review/review-pins';
import { FigureThreads } from './figure-threads';

/**
 * The review comments of one figure of the results page: a marker beside the figure's heading with the
 * number of threads (coloured by the highest open severity, striped when one is outdated), which unfolds
 * the threads with their replies, resolve / re-open, and a form for a new comment. Writing is for leads,
 * engineers and reviewers; others read. Nothing is shown for a draft solve (FigureThreads.revision null).
 */
@Component({
  selector: 'pl-figure-comments',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButton, MatIcon],
  templateUrl: './figure-comments.html',
  styleUrl: './figure-comments.scss',
  host: { '[class.expanded]': 'expanded()' },
})
export class FigureComments {
  protected readonly threads = inject(FigureThreads);

  readonly figure = input.required<ResultFigure>();

  protected readonly severities = ANNOTATION_SEVERITIES;
  protected readonly name = computed(() => RESULT_FIGURE_LABELS[this.figure()]);
  protected readonly list = computed(() => this.threads.byFigure().get(this.figure()) ?? []);
  protected readonly pin = computed(() => pinsOf(this.list(), RESULT_KINDS).get(`result:${this.figure()}`) ?? null);
  protected readonly expanded = computed(() => this.threads.opened() === this.figure());
  protected readonly label = computed(() => {
    const pin = this.pin();
    const action = this.expanded() ? 'hide them' : 'show them';
    if (pin) return `${this.name()}: ${pinLabel(pin, action, 'figure')}`;
    return this.threads.canAnnotate() ? `${this.name()}: no comments; add one` : `${this.name()}: no comments`;
  });

  protected async add(form: HTMLFormElement): Promise<void> {
    const data = new FormData(form);
    const body = String(data.get('body') ?? '').trim();
    if (body === '') return;
    // The text stays in the form until the server has stored it.
    if (await this.threads.add(this.figure(), String(data.get('severity')) as AnnotationSeverity, body)) form.reset();
  }

  protected async reply(thread: Annotation, text: HTMLTextAreaElement): Promise<void> {
    if (text.value.trim() === '') return;
    if (await this.threads.reply(thread, text.value)) text.value = '';
  }
}
