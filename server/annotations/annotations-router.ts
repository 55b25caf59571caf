import { Router } from 'express';
import { z } from 'zod';
import { annotationListQuery, createAnnotationBody, replyBody } from '../../shared/api/annotations.js';
import { recordId } from '../../shared/api/common.js';
import type { AppContext } from '../app-context.js';
import { requireUser } from '../auth/session-user.js';
import { parseInput } from '../http/validate.js';
import type { Notifier } from '../mail/notifier.js';
import { createAnnotationService } from './annotation-service.js';

const modelParams = z.object({ projectId: recordId, modelId: recordId });
const annotationParams = z.object({ projectId: recordId, annotationId: recordId });

/** Annotation threads on models (routes: shared/api/index.ts). */
export function annotationsRouter({ db }: AppContext, notifier: Notifier): Router {
  const service = createAnnotationService(db, notifier);
  const router = Router();

  router.get('/projects/:projectId/models/:modelId/annotations', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const query = parseInput(annotationListQuery, req.query, 'query');
    res.json(await service.list(requireUser(req), projectId, modelId, query));
  });

  router.post('/projects/:projectId/models/:modelId/annotations', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const body = parseInput(createAnnotationBody, req.body, 'body');
    res.status(201).json(await service.create(requireUser(req), projectId, modelId, body));
  });

  router.post('/projects/:projectId/annotations/:annotationId/replies', async (req, res) => {
    const { projectId, annotationId } = parseInput(annotationParams, req.params, 'params');
    const { body } = parseInput(replyBody, req.body, 'body');
    res.status(201).json(await service.reply(requireUser(req), projectId, annotationId, body));
  });

  router.post('/projects/:projectId/annotations/:annotationId/resolve', async (req, res) => {
    const { projectId, annotationId } = parseInput(annotationParams, req.params, 'params');
    res.json(await service.resolve(requireUser(req), projectId, annotationId));
  });

  router.post('/projects/:projectId/annotations/:annotationId/reopen', async (req, res) => {
    const { projectId, annotationId } = parseInput(annotationParams, req.params, 'params');
    res.json(await service.reopen(requireUser(req), projectId, annotationId));
  });

  return router;
}
