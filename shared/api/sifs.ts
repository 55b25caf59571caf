import { z } from 'zod';
import { multiLine, pageOf, pageQuery, queryBoolean, recordId, singleLine, timestamp } from './common.js';
import { derivedSifTarget, sifDemandMode, sifRequirementIssues, sifTarget } from './sif-target.js';

/**
 * Lifecycle of a SIF record. draft -> in-review (lead, engineer) -> approved (lead, reviewer) or back to
 * draft (lead, reviewer); superseded (lead, engineer) marks a record replaced by another.
 */
export const SIF_STATUSES = ['draft', 'in-review', 'approved', 'superseded'] as const;
export const sifStatus = z.enum(SIF_STATUSES, { message: 'must be one of draft, in-review, approved, superseded' });
export type SifStatus = z.infer<typeof sifStatus>;

/** Tags like "PZT-1101" or "SIF 20/3": 1-40 letters, digits, spaces, "-", "_", ".", "/". Unique in a project. */
export const sifTag = singleLine(40, 1).pipe(
  z.string().regex(/^[A-Za-z0-9][A-Za-z0-9 _./-]*$/, 'must start with a letter or digit and use only letters, digits, spaces, "-", "_", "." or "/"'),
);

/** Mission time in hours: more than 0, at most 876 000 (100 years). */
export const missionHours = z
  .number({ message: 'must be a number of hours' })
  .finite('must be a finite number')
  .positive('must be greater than 0')
  .max(876_000, 'must be at most 876000 hours (100 years)');

/** Demands per year from the hazard analysis; null when not known. */
export const demandRatePerYear = z
  .number({ message: 'must be a number per year' })
  .finite('must be a finite number')
  .positive('must be greater than 0')
  .max(1_000_000, 'must be at most 1000000 per year')
  .nullable();

export const sif = z.object({
  id: recordId,
  projectId: recordId,
  tag: z.string(),
  title: z.string(),
  hazardousEvent: z.string(),
  demandMode: sifDemandMode,
  target: sifTarget,
  /** Derived from `target` for the demand mode by `deriveSifTarget`. */
  derivedTarget: derivedSifTarget,
  demandRatePerYear: z.number().nullable(),
  missionHours: z.number(),
  status: sifStatus,
  ownerId: recordId,
  ownerDisplayName: z.string(),
  /** Optimistic version: starts at 1, raised by every change; PATCH must send the version it read. */
  version: z.number().int().min(1),
  archived: z.boolean(),
  createdAt: timestamp,
  updatedAt: timestamp,
});
export type Sif = z.infer<typeof sif>;

const sifFields = {
  tag: sifTag,
  title: singleLine(200, 1),
  hazardousEvent: multiLine(4000, 1),
  demandMode: sifDemandMode,
  target: sifTarget,
  demandRatePerYear: demandRatePerYear,
  missionHours,
};

/** Creates a SIF in "draft"; the owner defaults to the creator and must be a lead or engineer of the project. */
export const createSifBody = z
  .strictObject({
    ...sifFields,
    demandRatePerYear: demandRatePerYear.default(null),
    ownerId: recordId.optional(),
  })
  .superRefine((body, context) => {
    for (const issue of sifRequirementIssues(body)) {
      context.addIssue({ code: 'custom', path: issue.path.split('.'), message: issue.message });
    }
  });
export type CreateSifBody = z.input<typeof createSifBody>;

/**
 * Changes to a SIF; `version` is the version the change is based on. The server checks the merged record
 * with `sifRequirementIssues` (e.g. a new demand mode against the stored target).
 */
export const updateSifBody = z
  .strictObject({
    version: z.number({ message: 'must be the version number you read' }).int('must be a whole number').min(1, 'must be 1 or more'),
    tag: sifFields.tag.optional(),
    title: sifFields.title.optional(),
    hazardousEvent: sifFields.hazardousEvent.optional(),
    demandMode: sifFields.demandMode.optional(),
    target: sifFields.target.optional(),
    demandRatePerYear: demandRatePerYear.optional(),
    missionHours: missionHours.optional(),
    status: sifStatus.optional(),
    ownerId: recordId.optional(),
  })
  .refine((body) => Object.keys(body).length > 1, 'must change at least one field besides version');
export type UpdateSifBody = z.input<typeof updateSifBody>;

/** details of the 409 version_conflict of a stale PATCH: the record as stored now. */
export const sifConflictDetails = z.object({
  current: sif,
});
export type SifConflictDetails = z.infer<typeof sifConflictDetails>;

export const SIF_SORT_KEYS = ['tag', 'title', 'demandMode', 'sil', 'status', 'createdAt', 'updatedAt'] as const;

/**
 * GET /api/projects/:projectId/sifs. `search` matches tag, title and hazardous event (case-insensitive,
 * substring); `status` filters one status; archived SIFs are left out unless includeArchived=true.
 */
export const sifListQuery = z
  .object({
    search: z.string().trim().max(200, 'must have at most 200 characters').optional(),
    status: sifStatus.optional(),
    includeArchived: queryBoolean.default(false),
    sort: z.enum(SIF_SORT_KEYS, { message: `must be one of ${SIF_SORT_KEYS.join(', ')}` }).default('tag'),
    order: z.enum(['asc', 'desc'], { message: 'must be asc or desc' }).default('asc'),
  })
  .extend(pageQuery.shape);
export type SifListQuery = z.input<typeof sifListQuery>;

export const sifPage = pageOf(sif);
export type SifPage = z.infer<typeof sifPage>;
