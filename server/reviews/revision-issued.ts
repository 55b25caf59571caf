import type { SessionUser } from '../auth/session-user.js';
import { recordAudit } from '../audit/audit-trail.js';
import type { Database } from '../db/client.js';
import { moveSifStatus } from './sif-status.js';

/**
 * Called by the model service once a revision is issued: the audit trail records it, and an approved SIF
 * becomes superseded, since its approval covered the revision before.
 */
export async function revisionIssued(
  db: Database,
  user: SessionUser,
  issued: { projectId: string; sifId: string; modelId: string; modelName: string; number: number; reason: string },
): Promise<void> {
  await recordAudit(db, {
    projectId: issued.projectId,
    sifId: issued.sifId,
    actor: user,
    action: 'revision.issued',
    summary: `issued revision ${issued.number} of ${issued.modelName}: ${issued.reason}`,
    details: { modelId: issued.modelId, revision: issued.number, reason: issued.reason },
  });
  await moveSifStatus(db, issued.sifId, 'superseded', ['approved']);
}
