import { Router } from 'express';
import { z } from 'zod';
import { recordId } from '../../shared/api/common.js';
import { decideReviewBody, requestReviewBody, returnReviewBody, revisionDiffQuery } from '../../shared/api/reviews.js';
import type { AppContext } from '../app-context.js';
import { requireUser } from '../auth/session-user.js';
import { parseInput } from '../http/validate.js';
import type { Notifier } from '../mail/notifier.js';
import { createReviewService } from './review-service.js';

const modelParams = z.object({ projectId: recordId, modelId: recordId });
const sifParams = z.object({ projectId: recordId, sifId: recordId });
const roundParams = z.object({ projectId: recordId, roundId: recordId });

/** Review rounds, the reviewer's queue and the revision diff (routes: shared/api/index.ts). */
export function reviewsRouter({ db }: AppContext, notifier: Notifier): Router {
  const service = createReviewService(db, notifier);
  const router = Router();

  router.get('/reviews/queue', async (req, res) => {
    res.json(await service.queue(requireUser(req)));
  });

  router.post('/projects/:projectId/models/:modelId/reviews', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const body = parseInput(requestReviewBody, req.body, 'body');
    res.status(201).json(await service.request(requireUser(req), projectId, modelId, body));
  });

  router.get('/projects/:projectId/models/:modelId/diff', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const { from, to } = parseInput(revisionDiffQuery, req.query, 'query');
    res.json(await service.diff(requireUser(req), projectId, modelId, from, to));
  });

  router.get('/projects/:projectId/sifs/:sifId/reviews', async (req, res) => {
    const { projectId, sifId } = parseInput(sifParams, req.params, 'params');
    res.json(await service.listBySif(requireUser(req), projectId, sifId));
  });

  router.get('/projects/:projectId/reviews/:roundId', async (req, res) => {
    const { projectId, roundId } = parseInput(roundParams, req.params, 'params');
    res.json(await service.get(requireUser(req), projectId, roundId));
  });

  router.post('/projects/:projectId/reviews/:roundId/approve', async (req, res) => {
    const { projectId, roundId } = parseInput(roundParams, req.params, 'params');
    const body = parseInput(decideReviewBody, req.body ?? {}, 'body');
    res.json(await service.approve(requireUser(req), projectId, roundId, body));
  });

  router.post('/projects/:projectId/reviews/:roundId/return', async (req, res) => {
    const { projectId, roundId } = parseInput(roundParams, req.params, 'params');
    const body = parseInput(returnReviewBody, req.body, 'body');
    res.json(await service.returnRound(requireUser(req), projectId, roundId, body));
  });

  return router;
}
