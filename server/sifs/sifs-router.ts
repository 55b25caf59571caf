import { Router } from 'express';
import { z } from 'zod';
import { recordId } from '../../shared/api/common.js';
import { archiveBody } from '../../shared/api/projects.js';
import { createSifBody, sifListQuery, updateSifBody } from '../../shared/api/sifs.js';
import type { AppContext } from '../app-context.js';
import { requireUser } from '../auth/session-user.js';
import { parseInput } from '../http/validate.js';
import { SifsService } from './sifs-service.js';

const listParams = z.object({ projectId: recordId });
const sifParams = z.object({ projectId: recordId, sifId: recordId });

export function sifsRouter({ db }: AppContext): Router {
  const router = Router();

  router.get('/projects/:projectId/sifs', async (req, res) => {
    const user = requireUser(req);
    const { projectId } = parseInput(listParams, req.params, 'params');
    const query = parseInput(sifListQuery, req.query, 'query');
    res.json(await new SifsService(db, user).list(projectId, query));
  });

  router.post('/projects/:projectId/sifs', async (req, res) => {
    const user = requireUser(req);
    const { projectId } = parseInput(listParams, req.params, 'params');
    const body = parseInput(createSifBody, req.body, 'body');
    res.status(201).json(await new SifsService(db, user).create(projectId, body));
  });

  router.get('/projects/:projectId/sifs/:sifId', async (req, res) => {
    const user = requireUser(req);
    const { projectId, sifId } = parseInput(sifParams, req.params, 'params');
    res.json(await new SifsService(db, user).get(projectId, sifId));
  });

  router.patch('/projects/:projectId/sifs/:sifId', async (req, res) => {
    const user = requireUser(req);
    const { projectId, sifId } = parseInput(sifParams, req.params, 'params');
    const body = parseInput(updateSifBody, req.body, 'body');
    res.json(await new SifsService(db, user).update(projectId, sifId, body));
  });

  router.post('/projects/:projectId/sifs/:sifId/archive', async (req, res) => {
    const user = requireUser(req);
    const { projectId, sifId } = parseInput(sifParams, req.params, 'params');
    const { archived } = parseInput(archiveBody, req.body ?? {}, 'body');
    res.json(await new SifsService(db, user).setArchived(projectId, sifId, archived));
  });

  return router;
}
