import { z } from 'zod';
import { multiLine, recordId, singleLine, timestamp } from './common.js';

/** What an annotation is pinned to: an item of the model (by its id), the whole model, or a result figure. */
export const ANNOTATION_TARGET_KINDS = ['gate', 'event', 'ccf', 'state', 'transition', 'model', 'result'] as const;
export const annotationTargetKind = z.enum(ANNOTATION_TARGET_KINDS, {
  message: `must be one of ${ANNOTATION_TARGET_KINDS.join(', ')}`,
});
export type AnnotationTargetKind = z.infer<typeof annotationTargetKind>;

export const ANNOTATION_SEVERITIES = ['question', 'remark', 'must-fix'] as const;
export const annotationSeverity = z.enum(ANNOTATION_SEVERITIES, { message: 'must be question, remark or must-fix' });
export type AnnotationSeverity = z.infer<typeof annotationSeverity>;

export const ANNOTATION_STATUSES = ['open', 'resolved'] as const;
export const annotationStatus = z.enum(ANNOTATION_STATUSES);
export type AnnotationStatus = z.infer<typeof annotationStatus>;

/**
 * The figures and tables of the results page a thread can be pinned to (target kind "result", itemId one of
 * these). Which values of each one decide that a carried-forward thread is outdated is listed in
 * server/annotations/result-figures.ts.
 */
export const RESULT_FIGURES = ['verdict', 'pfd-curve', 'weakest-link', 'spurious-trips', 'cut-sets', 'importance', 'constraints', 'sensitivity'] as const;
export type ResultFigure = (typeof RESULT_FIGURES)[number];
export const RESULT_FIGURE_LABELS: Readonly<Record<ResultFigure, string>> = {
  verdict: 'Verdict',
  'pfd-curve': 'PFD(t) chart',
  'weakest-link': 'Weakest link',
  'spurious-trips': 'Spurious trips',
  'cut-sets': 'Minimal cut sets',
  importance: 'Importance measures',
  constraints: 'Architectural constraints and the SIL claim',
  sensitivity: 'Sensitivity and uncertainty',
};
export const isResultFigure = (value: string | null): value is ResultFigure => (RESULT_FIGURES as readonly (string | null)[]).includes(value);

/** What a thread is pinned to, in words: "gate TOP", "the whole model", "result figure PFD(t) chart". */
export function describeAnnotationTarget(target: { kind: AnnotationTargetKind; itemId: string | null }): string {
  if (target.kind === 'model') return 'the whole model';
  if (target.kind === 'result') return `result figure ${isResultFigure(target.itemId) ? RESULT_FIGURE_LABELS[target.itemId] : (target.itemId ?? '')}`.trim();
  return `${target.kind} ${target.itemId ?? ''}`.trim();
}

/**
 * The pin. itemId is the item's id in the model file (a transition's id is "from->to", a state of a part
 * "part/state"); "model" has no itemId; "result" names the figure (one of RESULT_FIGURES).
 */
export const annotationTarget = z
  .strictObject({ kind: annotationTargetKind, itemId: singleLine(200).nullable().default(null) })
  .superRefine((target, context) => {
    if (target.kind === 'model' && target.itemId !== null) {
      context.addIssue({ code: 'custom', path: ['itemId'], message: 'must be null for an annotation on the whole model' });
    }
    if (target.kind !== 'model' && (target.itemId === null || target.itemId === '')) {
      context.addIssue({ code: 'custom', path: ['itemId'], message: `must name the ${target.kind} the annotation is pinned to` });
    } else if (target.kind === 'result' && !isResultFigure(target.itemId)) {
      context.addIssue({ code: 'custom', path: ['itemId'], message: `must be one of the result figures: ${RESULT_FIGURES.join(', ')}` });
    }
  });
export type AnnotationTarget = z.infer<typeof annotationTarget>;

export const createAnnotationBody = z.strictObject({
  /** The issued revision the annotator looked at. */
  revision: z.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more'),
  target: annotationTarget,
  severity: annotationSeverity,
  body: multiLine(5000, 1),
  /**
   * Result figures only: the solve of that revision whose figure the annotator looked at (default: the
   * revision's latest succeeded solve). Its values are kept with the thread to tell later whether the figure changed.
   */
  solveId: recordId.optional(),
});
export type CreateAnnotationBody = z.input<typeof createAnnotationBody>;

export const replyBody = z.strictObject({ body: multiLine(5000, 1) });
export type ReplyBody = z.input<typeof replyBody>;

export const annotationListQuery = z.object({
  /** Show the threads as they stand on this revision (default: the latest issued one). */
  revision: z.coerce.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more').optional(),
  status: annotationStatus.optional(),
  severity: annotationSeverity.optional(),
});
export type AnnotationListQuery = z.input<typeof annotationListQuery>;
export type AnnotationFilter = z.output<typeof annotationListQuery>;

export const annotationReply = z.object({
  id: recordId,
  authorId: recordId,
  authorDisplayName: z.string(),
  body: z.string(),
  createdAt: timestamp,
});
export type AnnotationReply = z.infer<typeof annotationReply>;

export const annotation = z.object({
  id: recordId,
  projectId: recordId,
  sifId: recordId,
  modelId: recordId,
  /** The revision it was written on; it is carried forward to every later revision. */
  revision: z.number().int(),
  target: z.object({ kind: annotationTargetKind, itemId: z.string().nullable() }),
  severity: annotationSeverity,
  status: annotationStatus,
  body: z.string(),
  authorId: recordId,
  authorDisplayName: z.string(),
  createdAt: timestamp,
  resolvedById: recordId.nullable(),
  resolvedAt: timestamp.nullable(),
  /** Its item changed (or is gone) between the revision it was written on and the revision shown; for a result figure, the figure's values changed. */
  outdated: z.boolean(),
  /** Why it is outdated, in words ("the figure changed: PFDavg 0.00123 -> 0.00246"); null when it is not. */
  outdatedBecause: z.string().nullable(),
  /** Result figures: the solve the annotator looked at; null for other pins or when the revision had no result yet. */
  solveId: recordId.nullable(),
  replies: z.array(annotationReply),
});
export type Annotation = z.infer<typeof annotation>;

export const annotationList = z.object({ revision: z.number().int(), annotations: z.array(annotation) });
export type AnnotationList = z.infer<typeof annotationList>;
