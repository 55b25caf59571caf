import { canEditModels } from '../../shared/api/models.js';
import { requireActiveProject, roleForbids, type ProjectAccess } from '../projects/project-access.js';

/** 403 unless the caller may change models and start solves here (lead, engineer); 409 in an archived project. */
export function requireModelEditor(access: ProjectAccess, doing: string): void {
  if (!canEditModels(access.role)) throw roleForbids(access, doing);
  requireActiveProject(access);
}
