import { Router } from 'express';
import { sql } from 'drizzle-orm';
import type { AppContext } from '../app-context.js';
import { apiErrors } from '../errors.js';

/** GET /api/health: 200 { status: "ok" } when the database answers, else 503. No sign-in needed. */
export function healthRouter({ db }: AppContext): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    try {
      await db.execute(sql`select 1`);
    } catch {
      throw apiErrors.serviceUnavailable();
    }
    res.json({ status: 'ok' });
  });
  return router;
}
