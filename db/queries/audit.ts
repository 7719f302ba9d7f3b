/** The audit trail: who did what to which record. Details are JSON; never put a secret in them. */
import { auditEvents } from '@/db/schema';
import { newId, type Queryable } from './types';

export type AuditInput = {
  workshopId: string | null;
  actorId: string | null;
  action: string;
  targetType?: string;
  targetId?: string;
  detail?: Record<string, unknown>;
  ip?: string | null;
};

export async function recordAudit(db: Queryable, e: AuditInput): Promise<void> {
  await db.insert(auditEvents).values({
    id: newId(),
    workshopId: e.workshopId,
    actorId: e.actorId,
    action: e.action,
    targetType: e.targetType ?? null,
    targetId: e.targetId ?? null,
    detailJson: e.detail ? JSON.stringify(e.detail) : null,
    ip: e.ip ?? null,
  });
}
