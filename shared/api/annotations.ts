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
 * The pin. itemId is the item's id in the model file (a transition's id is "from->to", a state of a part
 * "part/state"); "model" has no itemId; "result" names the figure (e.g. "pfd-curve", "pfdAvg").
 */
export const annotationTarget = z
  .strictObject({ kind: annotationTargetKind, itemId: singleLine(200).nullable().default(null) })
  .superRefine((target, context) => {
    if (target.kind === 'model' && target.itemId !== null) {
      context.addIssue({ code: 'custom', path: ['itemId'], message: 'must be null for an annotation on the whole model' });
    }
    if (target.kind !== 'model' && (target.itemId === null || target.itemId === '')) {
      context.addIssue({ code: 'custom', path: ['itemId'], message: `must name the ${target.kind} the annotation is pinned to` });
    }
  });
export type AnnotationTarget = z.infer<typeof annotationTarget>;

export const createAnnotationBody = z.strictObject({
  /** The issued revision the annotator looked at. */
  revision: z.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more'),
  target: annotationTarget,
  severity: annotationSeverity,
  body: multiLine(5000, 1),
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
  /** Its item changed (or is gone) between the revision it was written on and the revision shown. */
  outdated: z.boolean(),
  replies: z.array(annotationReply),
});
export type Annotation = z.infer<typeof annotation>;

export const annotationList = z.object({ revision: z.number().int(), annotations: z.array(annotation) });
export type AnnotationList = z.infer<typeof annotationList>;
