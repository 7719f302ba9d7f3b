/** The audit trail: who did what to which record. Details are JSON; never put a secret in them. */
import { and, desc, eq } from 'drizzle-orm';
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

export async function listAudit(db: Queryable, workshopId: string, opts: { action?: string; limit?: number } = {}) {
  const where = opts.action ? and(eq(auditEvents.workshopId, workshopId), eq(auditEvents.action, opts.action)) : eq(auditEvents.workshopId, workshopId);
  return db.select().from(auditEvents).where(where).orderBy(desc(auditEvents.createdAt)).limit(opts.limit ?? 100);
}
