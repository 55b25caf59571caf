import { Router } from 'express';
import { z } from 'zod';
import { auditQuery } from '../../shared/api/audit.js';
import { recordId } from '../../shared/api/common.js';
import type { AppContext } from '../app-context.js';
import { requireUser } from '../auth/session-user.js';
import { parseInput } from '../http/validate.js';
import { loadProjectAccess } from '../projects/project-access.js';
import { auditCsv, listAudit } from './audit-trail.js';

const projectParams = z.object({ projectId: recordId });

/** The audit trail per project and per SIF, as JSON and CSV; every member and site admin reads it. */
export function auditRouter({ db }: AppContext): Router {
  const router = Router();

  router.get('/projects/:projectId/audit', async (req, res) => {
    const { projectId } = parseInput(projectParams, req.params, 'params');
    const { sifId } = parseInput(auditQuery, req.query, 'query');
    await loadProjectAccess(db, requireUser(req), projectId);
    res.json(await listAudit(db, projectId, sifId));
  });

  router.get('/projects/:projectId/audit/csv', async (req, res) => {
    const { projectId } = parseInput(projectParams, req.params, 'params');
    const { sifId } = parseInput(auditQuery, req.query, 'query');
    await loadProjectAccess(db, requireUser(req), projectId);
    res.type('text/csv').attachment(sifId ? `audit-sif-${sifId}.csv` : `audit-project-${projectId}.csv`).send(auditCsv(await listAudit(db, projectId, sifId)));
  });

  return router;
}
