import { z } from 'zod';
import { multiLine, recordId, timestamp } from './common.js';
import type { ProjectRole } from './projects.js';
import { modelKind } from './models.js';

export const REVIEW_ROUND_STATUSES = ['open', 'approved', 'returned'] as const;
export const reviewRoundStatus = z.enum(REVIEW_ROUND_STATUSES);
export type ReviewRoundStatus = z.infer<typeof reviewRoundStatus>;

/** Roles that may be chosen as reviewers and may decide a round (never on a revision they issued or asked review of). */
export const REVIEWER_ROLES: readonly ProjectRole[] = ['lead', 'reviewer'];
/** Roles that may annotate, reply, resolve and re-open. */
export const ANNOTATOR_ROLES: readonly ProjectRole[] = ['lead', 'engineer', 'reviewer'];

export const requestReviewBody = z.strictObject({
  /** The issued revision to review; it must be the model's latest. */
  revision: z.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more'),
  reviewerIds: z.array(recordId, { message: 'must list the reviewers' }).min(1, 'choose at least one reviewer').max(20, 'at most 20 reviewers'),
  message: multiLine(5000),
});
export type RequestReviewBody = z.input<typeof requestReviewBody>;

export const decideReviewBody = z.strictObject({ comment: multiLine(5000).default('') });
export type DecideReviewBody = z.input<typeof decideReviewBody>;

/** Returning a round needs a comment saying why. */
export const returnReviewBody = z.strictObject({ comment: multiLine(5000, 1) });
export type ReturnReviewBody = z.input<typeof returnReviewBody>;

export const reviewRound = z.object({
  id: recordId,
  projectId: recordId,
  sifId: recordId,
  sifTag: z.string(),
  modelId: recordId,
  modelName: z.string(),
  modelKind,
  revision: z.number().int(),
  message: z.string(),
  status: reviewRoundStatus,
  requestedById: recordId,
  requestedByDisplayName: z.string(),
  requestedAt: timestamp,
  reviewers: z.array(z.object({ userId: recordId, displayName: z.string() })),
  decidedById: recordId.nullable(),
  decidedAt: timestamp.nullable(),
  decisionComment: z.string(),
});
export type ReviewRound = z.infer<typeof reviewRound>;
export const reviewRoundList = z.array(reviewRound);
export type ReviewRoundList = z.infer<typeof reviewRoundList>;

export const revisionDiffQuery = z.object({
  from: z.coerce.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more'),
  to: z.coerce.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more'),
});
export type RevisionDiffQuery = z.input<typeof revisionDiffQuery>;

/** old is absent for an added item's fields, new for a removed item's (JSON has no undefined). */
const fieldChange = z.object({ field: z.string(), old: z.unknown().optional(), new: z.unknown().optional() });
export const itemChange = z.object({
  kind: z.string(),
  id: z.string(),
  change: z.enum(['added', 'removed', 'changed']),
  fields: z.array(fieldChange),
});

export const resultFigureChange = z.object({ figure: z.string(), old: z.number().nullable(), new: z.number().nullable() });
export const revisionDiff = z.object({
  from: z.number().int(),
  to: z.number().int(),
  items: z.array(itemChange),
  /** Null unless both revisions have a stored result of a succeeded solve (the latest of each). */
  results: z.array(resultFigureChange).nullable(),
});
export type RevisionDiff = z.infer<typeof revisionDiff>;
