import { z } from 'zod';
import { multiLine, queryBoolean, recordId, singleLine, timestamp } from './common.js';

/**
 * Per-project roles. lead: manages members and everything an engineer does; engineer: creates and edits
 * SIFs; reviewer: reads, moves SIFs from "in review" to "approved" (or back to "draft"); viewer: reads.
 */
export const PROJECT_ROLES = ['lead', 'engineer', 'reviewer', 'viewer'] as const;
export const projectRole = z.enum(PROJECT_ROLES, { message: 'must be one of lead, engineer, reviewer, viewer' });
export type ProjectRole = z.infer<typeof projectRole>;

export const project = z.object({
  id: recordId,
  name: z.string(),
  description: z.string(),
  site: z.string(),
  unit: z.string(),
  client: z.string(),
  archived: z.boolean(),
  /** The signed-in user's role here; null for a site admin who is not a member. */
  myRole: projectRole.nullable(),
  createdAt: timestamp,
  updatedAt: timestamp,
});
export type Project = z.infer<typeof project>;

export const projectList = z.array(project);
export type ProjectList = z.infer<typeof projectList>;

export const createProjectBody = z.strictObject({
  name: singleLine(120, 1),
  description: multiLine(2000).default(''),
  site: singleLine(120).default(''),
  unit: singleLine(120).default(''),
  client: singleLine(120).default(''),
});
export type CreateProjectBody = z.input<typeof createProjectBody>;

export const updateProjectBody = z
  .strictObject({
    name: singleLine(120, 1).optional(),
    description: multiLine(2000).optional(),
    site: singleLine(120).optional(),
    unit: singleLine(120).optional(),
    client: singleLine(120).optional(),
  })
  .refine((body) => Object.keys(body).length > 0, 'must change at least one field');
export type UpdateProjectBody = z.input<typeof updateProjectBody>;

/** POST /api/projects/:projectId/archive and .../sifs/:sifId/archive; an empty body archives. */
export const archiveBody = z.strictObject({
  archived: z.boolean().default(true),
});
export type ArchiveBody = z.input<typeof archiveBody>;

export const projectListQuery = z.object({
  includeArchived: queryBoolean.default(false),
});
export type ProjectListQuery = z.input<typeof projectListQuery>;

export const member = z.object({
  userId: recordId,
  username: z.string(),
  displayName: z.string(),
  role: projectRole,
});
export type Member = z.infer<typeof member>;

export const memberList = z.array(member);
export type MemberList = z.infer<typeof memberList>;

/** PUT /api/projects/:projectId/members/:userId adds the user or changes their role. */
export const putMemberBody = z.strictObject({
  role: projectRole,
});
export type PutMemberBody = z.infer<typeof putMemberBody>;
