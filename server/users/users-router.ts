import { Router } from 'express';
import { recordId } from '../../shared/api/common.js';
import { createUserBody, updateUserBody } from '../../shared/api/users.js';
import { requireAdmin, requireUser } from '../auth/session-user.js';
import type { AppContext } from '../app-context.js';
import { parseInput } from '../http/validate.js';
import { z } from 'zod';
import { UsersService } from './users-service.js';

const userParams = z.object({ userId: recordId });

export function usersRouter({ db }: AppContext): Router {
  const router = Router();

  router.get('/users', async (req, res) => {
    res.json(await new UsersService(db, requireUser(req)).list());
  });

  router.post('/users', async (req, res) => {
    const actor = requireAdmin(req);
    const body = parseInput(createUserBody, req.body, 'body');
    res.status(201).json(await new UsersService(db, actor).create(body));
  });

  router.patch('/users/:userId', async (req, res) => {
    const actor = requireAdmin(req);
    const { userId } = parseInput(userParams, req.params, 'params');
    const body = parseInput(updateUserBody, req.body, 'body');
    res.json(await new UsersService(db, actor).update(userId, body));
  });

  return router;
}
