import type { ProjectRole } from '../../../shared/api/projects.js';

const ROLE_LABELS: Record<ProjectRole, string> = {
  lead: 'Lead',
  engineer: 'Engineer',
  reviewer: 'Reviewer',
  viewer: 'Viewer',
};

/** The user's standing in a project; null is a site admin who is not a member. */
export function roleLabel(role: ProjectRole | null): string {
  return role === null ? 'Site admin (not a member)' : ROLE_LABELS[role];
}
