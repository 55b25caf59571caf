import { Router } from 'express';
import { z } from 'zod';
import { recordId } from '../../shared/api/common.js';
import { putMemberBody } from '../../shared/api/projects.js';
import type { AppContext } from '../app-context.js';
import { requireUser } from '../auth/session-user.js';
import { parseInput } from '../http/validate.js';
import { MembersService } from './members-service.js';

const memberParams = z.object({ projectId: recordId, userId: recordId });

export function membersRouter({ db }: AppContext): Router {
  const router = Router();

  router.get('/projects/:projectId/members', async (req, res) => {
    const user = requireUser(req);
    const { projectId } = parseInput(memberParams.pick({ projectId: true }), req.params, 'params');
    res.json(await new MembersService(db, user).list(projectId));
  });

  router.put('/projects/:projectId/members/:userId', async (req, res) => {
    const user = requireUser(req);
    const { projectId, userId } = parseInput(memberParams, req.params, 'params');
    const { role } = parseInput(putMemberBody, req.body, 'body');
    res.json(await new MembersService(db, user).put(projectId, userId, role));
  });

  router.delete('/projects/:projectId/members/:userId', async (req, res) => {
    const user = requireUser(req);
    const { projectId, userId } = parseInput(memberParams, req.params, 'params');
    await new MembersService(db, user).remove(projectId, userId);
    res.status(204).end();
  });

  return router;
}
