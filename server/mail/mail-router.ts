import { Router } from 'express';
import { noticeSettingsBody } from '../../shared/api/audit.js';
import { requireUser } from '../auth/session-user.js';
import { apiErrors } from '../errors.js';
import { parseInput } from '../http/validate.js';
import type { Notifier } from './notifier.js';

/** The admin's list of sent notices and each user's own notice switch (routes: shared/api/index.ts). */
export function mailRouter(notifier: Notifier): Router {
  const router = Router();

  router.get('/admin/mail', async (req, res) => {
    if (!requireUser(req).isAdmin) throw apiErrors.forbidden('only a site admin may read the sent mail');
    res.json(await notifier.sent());
  });

  router.get('/me/notices', async (req, res) => {
    res.json(await notifier.settings(requireUser(req).id));
  });

  router.put('/me/notices', async (req, res) => {
    const { notices } = parseInput(noticeSettingsBody, req.body, 'body');
    res.json(await notifier.saveSettings(requireUser(req).id, notices));
  });

  return router;
}
