import { and, asc, eq } from 'drizzle-orm';
import type { AuditAction, AuditEntry } from '../../shared/api/audit.js';
import type { Database } from '../db/client.js';
import { auditEvents } from '../db/schema/reviews.js';
import { toCsv } from '../reports/csv.js';

export interface AuditRecord {
  readonly projectId: string;
  readonly sifId?: string | null;
  readonly actor: { readonly id: string; readonly displayName: string };
  readonly action: AuditAction;
  readonly summary: string;
  readonly details?: Record<string, unknown>;
}

/** Records one event of the audit trail; the actor's name is kept so the row reads the same later. */
export async function recordAudit(db: Database, record: AuditRecord): Promise<void> {
  await db.insert(auditEvents).values({
    projectId: record.projectId,
    sifId: record.sifId ?? null,
    actorId: record.actor.id,
    actorName: record.actor.displayName,
    action: record.action,
    summary: record.summary,
    details: record.details ?? {},
  });
}

/** The trail of a project, or of one SIF in it, oldest first (the caller checked access to the project). */
export async function listAudit(db: Database, projectId: string, sifId: string | undefined): Promise<AuditEntry[]> {
  const rows = await db
    .select()
    .from(auditEvents)
    .where(sifId ? and(eq(auditEvents.projectId, projectId), eq(auditEvents.sifId, sifId)) : eq(auditEvents.projectId, projectId))
    .orderBy(asc(auditEvents.at), asc(auditEvents.id));
  return rows.map((row) => ({
    id: row.id,
    projectId: row.projectId,
    sifId: row.sifId,
    actorId: row.actorId,
    actorDisplayName: row.actorName,
    action: row.action,
    summary: row.summary,
    details: row.details,
    at: row.at.toISOString(),
  }));
}

/** The trail as CSV; text that a spreadsheet would run as a formula is escaped (server/reports/csv.ts). */
export function auditCsv(entries: readonly AuditEntry[]): string {
  return toCsv(
    ['at', 'who', 'action', 'summary', 'sif_id', 'details'],
    entries.map((entry) => [entry.at, entry.actorDisplayName, entry.action, entry.summary, entry.sifId, JSON.stringify(entry.details)]),
  );
}
