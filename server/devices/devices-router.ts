import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { recordId } from '../../shared/api/common.js';
import {
  createDeviceBody,
  deviceListQuery,
  EVIDENCE_CONTENT_TYPES,
  importConfirmBody,
  importPreviewBody,
  MAX_EVIDENCE_BYTES,
  updateDeviceBody,
  uploadEvidenceFields,
} from '../../shared/api/devices.js';
import type { AppContext } from '../app-context.js';
import { requireUser } from '../auth/session-user.js';
import { apiErrors } from '../errors.js';
import { parseInput } from '../http/validate.js';
import { createDeviceService } from './device-service.js';

const deviceParams = z.object({ deviceId: recordId });
const versionParams = deviceParams.extend({
  version: z.coerce.number({ message: 'must be a version number' }).int('must be a whole number').min(1, 'must be 1 or more'),
});
const evidenceParams = deviceParams.extend({ evidenceId: recordId });

const MEGABYTES = MAX_EVIDENCE_BYTES / (1024 * 1024);

/** Receives one `file` field into memory (never to disk), refusing big files and undeclared types early. */
function receiveEvidenceFile(): RequestHandler {
  const single = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: MAX_EVIDENCE_BYTES, files: 1, fields: 4, fieldSize: 4096 },
    fileFilter: (_req, file, accept) => {
      const declared = file.mimetype === 'image/jpg' ? 'image/jpeg' : file.mimetype;
      if ((EVIDENCE_CONTENT_TYPES as readonly string[]).includes(declared)) accept(null, true);
      else accept(apiErrors.invalidField('file', `must be a PDF, PNG or JPEG file, not ${file.mimetype || 'a file of no type'}`));
    },
  }).single('file');
  return (req, res, next) =>
    single(req, res, (error: unknown) => {
      if (error instanceof multer.MulterError) {
        if (error.code === 'LIMIT_FILE_SIZE') next(apiErrors.payloadTooLarge(`file: must be at most ${MEGABYTES} MB`));
        else next(apiErrors.invalidField(error.field ?? 'file', `${error.message} (send one "file" field and an optional "description")`));
        return;
      }
      next(error);
    });
}

/** The site-wide device library (routes: shared/api/index.ts; rules: shared/api/devices.ts). */
export function devicesRouter({ db }: AppContext): Router {
  const service = createDeviceService(db);
  const router = Router();

  router.get('/devices/access', async (req, res) => {
    res.json(await service.access(requireUser(req)));
  });

  router.get('/devices', async (req, res) => {
    const query = parseInput(deviceListQuery, req.query, 'query');
    res.json(await service.list(requireUser(req), query));
  });

  router.post('/devices', async (req, res) => {
    const body = parseInput(createDeviceBody, req.body, 'body');
    res.status(201).json(await service.create(requireUser(req), body));
  });

  router.get('/devices/export', async (req, res) => {
    const csv = await service.exportCsv(requireUser(req));
    const date = new Date().toISOString().slice(0, 10);
    res.attachment(`device-library-${date}.csv`).type('text/csv; charset=utf-8').send(`\uFEFF${csv}`);
  });

  router.post('/devices/import/preview', async (req, res) => {
    const body = parseInput(importPreviewBody, req.body, 'body');
    res.json(await service.previewImport(requireUser(req), body));
  });

  router.post('/devices/import/confirm', async (req, res) => {
    const body = parseInput(importConfirmBody, req.body, 'body');
    res.json(await service.confirmImport(requireUser(req), body));
  });

  router.get('/devices/:deviceId', async (req, res) => {
    const { deviceId } = parseInput(deviceParams, req.params, 'params');
    res.json(await service.get(requireUser(req), deviceId));
  });

  router.put('/devices/:deviceId', async (req, res) => {
    const { deviceId } = parseInput(deviceParams, req.params, 'params');
    const body = parseInput(updateDeviceBody, req.body, 'body');
    res.json(await service.update(requireUser(req), deviceId, body));
  });

  router.delete('/devices/:deviceId', async (req, res) => {
    const { deviceId } = parseInput(deviceParams, req.params, 'params');
    await service.remove(requireUser(req), deviceId);
    res.status(204).end();
  });

  router.post('/devices/:deviceId/archive', async (req, res) => {
    const { deviceId } = parseInput(deviceParams, req.params, 'params');
    res.json(await service.archive(requireUser(req), deviceId));
  });

  router.post('/devices/:deviceId/restore', async (req, res) => {
    const { deviceId } = parseInput(deviceParams, req.params, 'params');
    res.json(await service.restore(requireUser(req), deviceId));
  });

  router.get('/devices/:deviceId/usage', async (req, res) => {
    const { deviceId } = parseInput(deviceParams, req.params, 'params');
    res.json(await service.usage(requireUser(req), deviceId));
  });

  router.get('/devices/:deviceId/versions', async (req, res) => {
    const { deviceId } = parseInput(deviceParams, req.params, 'params');
    res.json(await service.listVersions(requireUser(req), deviceId));
  });

  router.get('/devices/:deviceId/versions/:version', async (req, res) => {
    const { deviceId, version } = parseInput(versionParams, req.params, 'params');
    res.json(await service.getVersion(requireUser(req), deviceId, version));
  });

  router.post(
    '/devices/:deviceId/evidence',
    async (req, _res, next) => {
      const { deviceId } = parseInput(deviceParams, req.params, 'params');
      await service.checkEvidenceUpload(requireUser(req), deviceId);
      next();
    },
    receiveEvidenceFile(),
    async (req, res) => {
      const { deviceId } = parseInput(deviceParams, req.params, 'params');
      const { description } = parseInput(uploadEvidenceFields, req.body ?? {}, 'body');
      if (!req.file) throw apiErrors.invalidField('file', 'is required (a PDF, PNG or JPEG file in the "file" field)');
      const saved = await service.addEvidence(requireUser(req), deviceId, {
        originalName: req.file.originalname,
        declaredType: req.file.mimetype,
        bytes: req.file.buffer,
        description,
      });
      res.status(201).json(saved);
    },
  );

  router.get('/devices/:deviceId/evidence/:evidenceId', async (req, res) => {
    const { deviceId, evidenceId } = parseInput(evidenceParams, req.params, 'params');
    const file = await service.evidenceFile(requireUser(req), deviceId, evidenceId);
    // attachment() guesses a type from the name; the stored type (checked by content) is set after it.
    res.attachment(file.fileName);
    res.setHeader('Content-Type', file.contentType);
    res.setHeader('Content-Length', String(file.byteSize));
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.setHeader('Content-Security-Policy', "default-src 'none'; sandbox");
    res.end(file.content);
  });

  router.delete('/devices/:deviceId/evidence/:evidenceId', async (req, res) => {
    const { deviceId, evidenceId } = parseInput(evidenceParams, req.params, 'params');
    await service.removeEvidence(requireUser(req), deviceId, evidenceId);
    res.status(204).end();
  });

  return router;
}
