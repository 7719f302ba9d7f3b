/**
 * The `worker.probe` job: proves a worker is alive and measures the queue without touching a photo. It waits
 * `payload.delayMs` (or the test delay), then finishes the job and writes one audit event `worker.probe` in
 * the same token-guarded transaction, so the audit trail shows exactly who finished each probe, once.
 */
import { auditEvents } from '@/db/schema';
import { finishJobInTx, LeaseLostError, withBusyRetry } from '@/db/queries/jobs';
import type { JobContext } from '@/lib/checks/run-analysis';

export async function runProbe(ctx: JobContext): Promise<void> {
  const payload = JSON.parse(ctx.job.payloadJson) as { delayMs?: unknown };
  const delayMs = typeof payload.delayMs === 'number' && payload.delayMs >= 0 ? Math.min(payload.delayMs, 60_000) : ctx.testDelayMs;
  if (delayMs > 0) await new Promise((r) => setTimeout(r, delayMs));
  ctx.assertHeld();
  await withBusyRetry('finish a probe', () => ctx.db.transaction(async (tx) => {
    if (!(await finishJobInTx(tx, ctx.job.id, ctx.job.lockToken))) throw new LeaseLostError(ctx.job.id);
    await tx.insert(auditEvents).values({
      id: crypto.randomUUID(),
      workshopId: null,
      actorId: null,
      action: 'worker.probe',
      targetType: 'job',
      targetId: ctx.job.id,
      detailJson: JSON.stringify({ workerId: ctx.job.lockedBy, attempt: ctx.job.attempts }),
    });
  }), { db: ctx.db });
}
