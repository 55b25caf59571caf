import { and, eq, inArray, ne, sql } from 'drizzle-orm';
import type { SifStatus } from '../../shared/api/sifs.js';
import type { Database } from '../db/client.js';
import { sifs } from '../db/schema/sifs.js';

/**
 * Moves a SIF's status as the review workflow says (draft -> in-review -> approved, returned -> draft,
 * approved -> superseded by a new revision), bumping its optimistic version so an open editor sees the change.
 * `from` limits the change to SIFs in one of those statuses; returns whether it changed.
 */
export async function moveSifStatus(db: Database, sifId: string, to: SifStatus, from?: readonly SifStatus[]): Promise<boolean> {
  const rows = await db
    .update(sifs)
    .set({ status: to, version: sql`${sifs.version} + 1` })
    .where(and(eq(sifs.id, sifId), ne(sifs.status, to), from ? inArray(sifs.status, [...from]) : undefined))
    .returning({ id: sifs.id });
  return rows.length > 0;
}
