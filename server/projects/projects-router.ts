import { Router } from 'express';
import { z } from 'zod';
import { recordId } from '../../shared/api/common.js';
import { archiveBody, createProjectBody, projectListQuery, updateProjectBody } from '../../shared/api/projects.js';
import type { AppContext } from '../app-context.js';
import { requireUser } from '../auth/session-user.js';
import { parseInput } from '../http/validate.js';
import { ProjectsService } from './projects-service.js';

const projectParams = z.object({ projectId: recordId });

export function projectsRouter({ db }: AppContext): Router {
  const router = Router();

  router.get('/projects', async (req, res) => {
    const user = requireUser(req);
    const query = parseInput(projectListQuery, req.query, 'query');
    res.json(await new ProjectsService(db, user).list(query.includeArchived));
  });

  router.post('/projects', async (req, res) => {
    const user = requireUser(req);
    const body = parseInput(createProjectBody, req.body, 'body');
    res.status(201).json(await new ProjectsService(db, user).create(body));
  });

  router.get('/projects/:projectId', async (req, res) => {
    const user = requireUser(req);
    const { projectId } = parseInput(projectParams, req.params, 'params');
    res.json(await new ProjectsService(db, user).get(projectId));
  });

  router.patch('/projects/:projectId', async (req, res) => {
    const user = requireUser(req);
    const { projectId } = parseInput(projectParams, req.params, 'params');
    const body = parseInput(updateProjectBody, req.body, 'body');
    res.json(await new ProjectsService(db, user).update(projectId, body));
  });

  router.post('/projects/:projectId/archive', async (req, res) => {
    const user = requireUser(req);
    const { projectId } = parseInput(projectParams, req.params, 'params');
    const { archived } = parseInput(archiveBody, req.body ?? {}, 'body');
    res.json(await new ProjectsService(db, user).setArchived(projectId, archived));
  });

  return router;
}
