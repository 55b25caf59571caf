import { Router } from 'express';
import { z } from 'zod';
import { recordId } from '../../shared/api/common.js';
import { createModelBody, exportModelQuery, importModelBody, issueRevisionBody, saveDraftBody } from '../../shared/api/models.js';
import { requireUser } from '../auth/session-user.js';
import { parseInput } from '../http/validate.js';
import type { AppContext } from '../app-context.js';
import { createModelService } from './model-service.js';

const sifParams = z.object({ projectId: recordId, sifId: recordId });
const modelParams = z.object({ projectId: recordId, modelId: recordId });
const revisionParams = modelParams.extend({
  number: z.coerce.number({ message: 'must be a revision number' }).int('must be a whole number').min(1, 'must be 1 or more'),
});

/** Models, drafts and revisions of a project's SIFs (routes: shared/api/index.ts). */
export function modelsRouter({ db }: AppContext): Router {
  const service = createModelService(db);
  const router = Router();

  router.get('/projects/:projectId/sifs/:sifId/models', async (req, res) => {
    const { projectId, sifId } = parseInput(sifParams, req.params, 'params');
    res.json(await service.list(requireUser(req), projectId, sifId));
  });

  router.post('/projects/:projectId/sifs/:sifId/models', async (req, res) => {
    const { projectId, sifId } = parseInput(sifParams, req.params, 'params');
    const body = parseInput(createModelBody, req.body, 'body');
    res.status(201).json(await service.create(requireUser(req), projectId, sifId, body));
  });

  router.get('/projects/:projectId/models/:modelId', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    res.json(await service.get(requireUser(req), projectId, modelId));
  });

  router.put('/projects/:projectId/models/:modelId/draft', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const body = parseInput(saveDraftBody, req.body, 'body');
    res.json(await service.saveDraft(requireUser(req), projectId, modelId, body));
  });

  router.post('/projects/:projectId/models/:modelId/import', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const body = parseInput(importModelBody, req.body, 'body');
    res.json(await service.importFile(requireUser(req), projectId, modelId, body));
  });

  router.get('/projects/:projectId/models/:modelId/export', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const { revision } = parseInput(exportModelQuery, req.query, 'query');
    const download = await service.exportFile(requireUser(req), projectId, modelId, revision);
    res.attachment(download.fileName).json(download.file);
  });

  router.get('/projects/:projectId/models/:modelId/revisions', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    res.json(await service.listRevisions(requireUser(req), projectId, modelId));
  });

  router.post('/projects/:projectId/models/:modelId/revisions', async (req, res) => {
    const { projectId, modelId } = parseInput(modelParams, req.params, 'params');
    const body = parseInput(issueRevisionBody, req.body, 'body');
    res.status(201).json(await service.issueRevision(requireUser(req), projectId, modelId, body));
  });

  router.get('/projects/:projectId/models/:modelId/revisions/:number', async (req, res) => {
    const { projectId, modelId, number } = parseInput(revisionParams, req.params, 'params');
    res.json(await service.getRevision(requireUser(req), projectId, modelId, number));
  });

  return router;
}
