import type { ProjectRole } from './projects.js';
import type { SifStatus } from './sifs.js';

/**
 * What each role may do in a project; the server enforces this table and the client uses it to hide
 * what a role cannot do.
 */
export const PROJECT_ACTIONS = [
  'project.read',
  'project.edit',
  'project.archive',
  'members.manage',
  'sif.create',
  'sif.edit',
  'sif.review',
  'sif.archive',
] as const;
export type ProjectAction = (typeof PROJECT_ACTIONS)[number];

const ROLE_ACTIONS: Record<ProjectRole, readonly ProjectAction[]> = {
  lead: PROJECT_ACTIONS,
  engineer: ['project.read', 'sif.create', 'sif.edit', 'sif.archive'],
  reviewer: ['project.read', 'sif.review'],
  viewer: ['project.read'],
};

/** A site admin administers every project (members, details, archive) but edits SIFs only through a role. */
const ADMIN_ACTIONS: readonly ProjectAction[] = ['project.read', 'project.edit', 'project.archive', 'members.manage'];

/** Whether a user with this project role (null: not a member) and admin flag may take the action. */
export function canDo(role: ProjectRole | null, isAdmin: boolean, action: ProjectAction): boolean {
  if (role !== null && ROLE_ACTIONS[role].includes(action)) return true;
  return isAdmin && ADMIN_ACTIONS.includes(action);
}

/**
 * Status changes of a SIF and the action each needs. An engineer or lead sends a draft for review, a
 * reviewer or lead approves it or sends it back; "sif.edit" also reopens or supersedes a record.
 */
export const SIF_STATUS_TRANSITIONS: readonly { from: SifStatus; to: SifStatus; action: ProjectAction }[] = [
  { from: 'draft', to: 'in-review', action: 'sif.edit' },
  { from: 'in-review', to: 'draft', action: 'sif.edit' },
  { from: 'in-review', to: 'draft', action: 'sif.review' },
  { from: 'in-review', to: 'approved', action: 'sif.review' },
  { from: 'approved', to: 'draft', action: 'sif.edit' },
  { from: 'approved', to: 'superseded', action: 'sif.edit' },
  { from: 'draft', to: 'superseded', action: 'sif.edit' },
  { from: 'superseded', to: 'draft', action: 'sif.edit' },
];

/** Whether the status change from -> to is allowed for this role (no change is always allowed). */
export function canChangeStatus(role: ProjectRole | null, isAdmin: boolean, from: SifStatus, to: SifStatus): boolean {
  if (from === to) return true;
  return SIF_STATUS_TRANSITIONS.some(
    (transition) => transition.from === from && transition.to === to && canDo(role, isAdmin, transition.action),
  );
}

/**
 * Statuses whose record content is frozen: an approved or superseded SIF changes only after it is set back
 * to draft (in the same request or before), so an approval always covers the record as reviewed.
 */
export const FROZEN_SIF_STATUSES: readonly SifStatus[] = ['approved', 'superseded'];
