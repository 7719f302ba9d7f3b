/**
 * The worker loop in this process (the same code the worker process runs) on a real migrated SQLite file:
 * what happens when a worker loses its lease, concurrency within one process, and retries.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { claimJob, enqueueJob, getJob, JOB_KINDS, finishJobInTx } from '@/db/queries/jobs';
import { LocalStorage } from '@/lib/storage';
import { PermanentJobError, type JobContext } from '@/lib/checks/run-analysis';
import { startWorker, type JobHandler } from '@/workers/run';
import { tempDb, type TempDb } from '../queue/helpers';

let t: TempDb;
beforeEach(async () => { t = await tempDb(); });
afterEach(() => t.close());

const quiet = () => undefined;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function worker(handlers: Record<string, JobHandler>, extra: Partial<Parameters<typeof startWorker>[0]> = {}) {
  return startWorker({ db: t.db, storage: new LocalStorage(`${t.dir}/s`), handlers, leaseMs: 300, pollMs: 20, log: quiet, ...extra });
}

describe('worker loop', () => {
  it('tells the handler when its lease was taken over, and its finish changes nothing', async () => {
    const job = await enqueueJob(t.db, { kind: JOB_KINDS.probe });
    let sawLoss = false;
    let finishedByStale: boolean | undefined;
    const w = worker({
      [JOB_KINDS.probe]: async (ctx: JobContext) => {
        // wait until another claimer took the job over and a renewal noticed
        for (let i = 0; i < 100 && !sawLoss; i++) {
          await sleep(20);
          try { ctx.assertHeld(); } catch { sawLoss = true; }
        }
        finishedByStale = await t.db.transaction((tx) => finishJobInTx(tx, ctx.job.id, ctx.job.lockToken));
      },
    });
    await sleep(50);
    // someone else claims as if the lease had run out (a clock far ahead)
    const thief = await claimJob(t.db, { workerId: 'thief', leaseMs: 10 ** 9, now: Date.now() + 10 ** 6 });
    expect(thief?.id).toBe(job.id);
    await sleep(600);
    await w.stop();
    expect(sawLoss).toBe(true);
    expect(finishedByStale).toBe(false);
    const row = await getJob(t.db, job.id);
    expect(row).toMatchObject({ status: 'running', lockedBy: 'thief', lockToken: thief!.lockToken });
  });

  it('runs WORKER_CONCURRENCY jobs at once in one process', async () => {
    for (let i = 0; i < 4; i++) await enqueueJob(t.db, { kind: JOB_KINDS.probe });
    let running = 0;
    let peak = 0;
    const w = worker({
      [JOB_KINDS.probe]: async (ctx) => {
        running++; peak = Math.max(peak, running);
        await sleep(150);
        running--;
        await t.db.transaction((tx) => finishJobInTx(tx, ctx.job.id, ctx.job.lockToken));
      },
    }, { concurrency: 2 });
    for (let i = 0; i < 100; i++) {
      const rows = await t.db.query.jobs.findMany();
      if (rows.every((r) => r.status === 'done')) break;
      await sleep(30);
    }
    await w.stop();
    expect(peak).toBe(2);
  });

  it('retries a failing job with backoff, then fails it with the last error for a person', async () => {
    process.env.JOB_BACKOFF_BASE_MS = '20';
    try {
      const job = await enqueueJob(t.db, { kind: JOB_KINDS.probe, maxAttempts: 3 });
      let calls = 0;
      const w = worker({ [JOB_KINDS.probe]: async () => { calls++; throw new Error('the bucket timed out'); } });
      for (let i = 0; i < 100 && (await getJob(t.db, job.id))?.status !== 'failed'; i++) await sleep(30);
      await w.stop();
      expect(calls).toBe(3);
      const row = await getJob(t.db, job.id);
      expect(row?.status).toBe('failed');
      expect(row?.lastError).toBe('the bucket timed out');
    } finally {
      delete process.env.JOB_BACKOFF_BASE_MS;
    }
  });

  it('does not retry a permanent error', async () => {
    const job = await enqueueJob(t.db, { kind: JOB_KINDS.probe });
    let calls = 0;
    const w = worker({ [JOB_KINDS.probe]: async () => { calls++; throw new PermanentJobError('The photo has no reference square.'); } });
    for (let i = 0; i < 100 && (await getJob(t.db, job.id))?.status !== 'failed'; i++) await sleep(20);
    await w.stop();
    expect(calls).toBe(1);
  });
});
