import type pg from 'pg';
import type { Database, Logger } from './db/client.js';

/** What every resource router is built from: `api.use(someRouter(context))` mounts one in app.ts. */
export interface AppContext {
  readonly db: Database;
  readonly pool: pg.Pool;
  readonly logger: Logger;
}
