/**
 * Queue semantics on a real migrated SQLite file. The properties are those of a lease-based work queue
 * (common practice): exclusive claims, token-guarded finish, exponential backoff, a final failed state.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { openDb, type Db } from '@/db/client';
import { jobs } from '@/db/schema';
import {
  backoffMs, claimJob, completeJob, DatabaseBusyError, enqueueJob, failJob, getJob, isBusyError, JOB_KINDS, reapExhaustedJobs, renewLease,
  withBusyRetry,
} from '@/db/queries/jobs';
import { tempDb, type TempDb } from './helpers';

let t: TempDb;
let db: Db;
beforeEach(async () => { t = await tempDb(); db = t.db; });
afterEach(() => t.close());

const lease = { workerId: 'test', leaseMs: 10_000 };

describe('claim', () => {
  it('hands each job to exactly one of many concurrent claimers on separate connections', async () => {
    const n = 30;
    for (let i = 0; i < n; i++) await enqueueJob(db, { kind: JOB_KINDS.probe, payload: { i } }, 1000 + i);
    // four independent clients on the same file, as four processes would be
    const clients = await Promise.all([0, 1, 2, 3].map(() => openDb(t.url)));
    const got: string[] = [];
    await Promise.all(clients.map(async (c, k) => {
      for (;;) {
        const job = await claimJob(c, { workerId: `w${k}`, leaseMs: 60_000, now: 5000 });
        if (!job) break;
        got.push(job.id);
      }
    }));
    clients.forEach((c) => c.$client.close());
    expect(got).toHaveLength(n);
    expect(new Set(got).size).toBe(n);
  });

  it('takes the job that has waited longest and only when it is due', async () => {
    const late = await enqueueJob(db, { kind: JOB_KINDS.probe, runAt: 2000 }, 0);
    const early = await enqueueJob(db, { kind: JOB_KINDS.probe, runAt: 1000 }, 0);
    expect(await claimJob(db, { ...lease, now: 999 })).toBeNull();
    expect((await claimJob(db, { ...lease, now: 2500 }))?.id).toBe(early.id);
    expect((await claimJob(db, { ...lease, now: 2500 }))?.id).toBe(late.id);
    expect(await claimJob(db, { ...lease, now: 2500 })).toBeNull();
  });

  it('gives a new random token on every claim and counts the attempt', async () => {
    await enqueueJob(db, { kind: JOB_KINDS.probe }, 0);
    const a = await claimJob(db, { workerId: 'a', leaseMs: 100, now: 10 });
    const b = await claimJob(db, { workerId: 'b', leaseMs: 100, now: 200 }); // a's lease ran out at 110
    expect(a && b).toBeTruthy();
    expect(a!.id).toBe(b!.id);
    expect(a!.lockToken).toMatch(/^[0-9a-f]{32}$/);
    expect(b!.lockToken).not.toBe(a!.lockToken);
    expect(b!.attempts).toBe(2);
    expect(b!.lockedBy).toBe('b');
  });
});

describe('clock', () => {
  it("judges due times and leases by the database's clock when no time is given", async () => {
    const job = await enqueueJob(db, { kind: JOB_KINDS.probe });
    const before = Date.now();
    const c = await claimJob(db, { workerId: 'w', leaseMs: 5000 });
    expect(c?.id).toBe(job.id);
    // SQLite's unixepoch('subsec') and this process read the same system clock here
    expect(Math.abs(c!.leaseExpiresAt! - (before + 5000))).toBeLessThan(1000);
    expect(await renewLease(db, c!.id, c!.lockToken, 60_000)).toBe(true);
    expect((await getJob(db, c!.id))!.leaseExpiresAt! - Date.now()).toBeGreaterThan(50_000);
  });
});

describe('lease', () => {
  it('keeps a renewed job away from other claimers and frees it once the lease expires', async () => {
    await enqueueJob(db, { kind: JOB_KINDS.probe }, 0);
    const a = await claimJob(db, { workerId: 'a', leaseMs: 100, now: 0 });
    expect(await renewLease(db, a!.id, a!.lockToken, 100, 90)).toBe(true); // now held until 190
    expect(await claimJob(db, { workerId: 'b', leaseMs: 100, now: 150 })).toBeNull();
    const b = await claimJob(db, { workerId: 'b', leaseMs: 100, now: 191 });
    expect(b?.id).toBe(a!.id);
    expect(await renewLease(db, a!.id, a!.lockToken, 100, 195)).toBe(false);
  });

  it("ignores a stale worker's finish and keeps the job with the new holder", async () => {
    await enqueueJob(db, { kind: JOB_KINDS.probe }, 0);
    const a = await claimJob(db, { workerId: 'a', leaseMs: 100, now: 0 });
    const b = await claimJob(db, { workerId: 'b', leaseMs: 100, now: 500 });
    expect(await completeJob(db, a!.id, a!.lockToken, 510)).toBe(false);
    expect((await getJob(db, a!.id))?.status).toBe('running');
    expect((await failJob(db, a!.id, a!.lockToken, { error: 'x', retryable: true, now: 510 })).outcome).toBe('lost');
    expect(await completeJob(db, b!.id, b!.lockToken, 520)).toBe(true);
    const done = await getJob(db, a!.id);
    expect(done?.status).toBe('done');
    expect(done?.finishedAt).toBe(520);
    expect(done?.lockToken).toBeNull();
    // finishing twice is a no-op too
    expect(await completeJob(db, b!.id, b!.lockToken, 530)).toBe(false);
  });
});

describe('retries', () => {
  it('grows the backoff exponentially with jitter in [d/2, d] and caps it', () => {
    expect(backoffMs(1, 0, 1000, 60_000)).toBe(500);
    expect(backoffMs(1, 0.999999, 1000, 60_000)).toBe(1000);
    expect(backoffMs(3, 0, 1000, 60_000)).toBe(2000);
    expect(backoffMs(3, 0.999999, 1000, 60_000)).toBe(4000);
    expect(backoffMs(30, 0.5, 1000, 60_000)).toBe(45_000);
  });

  it('requeues a retryable failure after the backoff and fails it with a message after max attempts', async () => {
    const job = await enqueueJob(db, { kind: JOB_KINDS.probe, maxAttempts: 3 }, 0);
    let now = 0;
    const delays: number[] = [];
    for (let attempt = 1; attempt <= 3; attempt++) {
      // not claimable before its run_at
      if (attempt > 1) expect(await claimJob(db, { ...lease, now: now - 1 })).toBeNull();
      const c = await claimJob(db, { ...lease, now });
      expect(c?.attempts).toBe(attempt);
      const r = await failJob(db, c!.id, c!.lockToken, { error: 'storage timed out', retryable: true, now, random: 0 });
      if (attempt < 3) {
        expect(r.outcome).toBe('retry');
        if (r.outcome === 'retry') { delays.push(r.runAt - now); now = r.runAt; }
      } else {
        expect(r.outcome).toBe('failed');
        if (r.outcome === 'failed') expect(r.message).toMatch(/failed 3 times; last error: storage timed out\. Try again later/);
      }
    }
    expect(delays[1]).toBe(2 * delays[0]!);
    const row = await getJob(db, job.id);
    expect(row?.status).toBe('failed');
    expect(row?.lastError).toBe('storage timed out');
    expect(await claimJob(db, { ...lease, now: now + 10 ** 9 })).toBeNull();
  });

  it('fails at once, without retrying, when the error cannot be fixed by another attempt', async () => {
    await enqueueJob(db, { kind: JOB_KINDS.probe }, 0);
    const c = await claimJob(db, { ...lease, now: 0 });
    const r = await failJob(db, c!.id, c!.lockToken, { error: 'no reference square found', retryable: false, now: 1 });
    expect(r).toEqual({ outcome: 'failed', attempts: 1, message: 'no reference square found' });
  });

  it('does not reclaim a crashed job on its last attempt but fails it with a reason', async () => {
    const job = await enqueueJob(db, { kind: JOB_KINDS.probe, maxAttempts: 2 }, 0);
    await claimJob(db, { workerId: 'a', leaseMs: 100, now: 0 });
    await claimJob(db, { workerId: 'b', leaseMs: 100, now: 200 });
    expect(await claimJob(db, { workerId: 'c', leaseMs: 100, now: 400 })).toBeNull();
    expect(await reapExhaustedJobs(db, 400)).toBe(1);
    const row = await getJob(db, job.id);
    expect(row?.status).toBe('failed');
    expect(await reapExhaustedJobs(db, 500)).toBe(0);
  });
});

describe('busy database', () => {
  it('retries while another connection holds the write lock, then says clearly what it was doing', async () => {
    await enqueueJob(db, { kind: JOB_KINDS.probe }, 0);
    // a second database whose connections give up at once, so the held lock shows as SQLITE_BUSY
    const impatient = await openDbWithTimeout(t.url, 1);
    const holder = await t.db.$client.transaction('write');
    await holder.execute('UPDATE jobs SET updated_at = 1');
    process.env.DB_BUSY_RETRY_MS = '300';
    try {
      const t0 = Date.now();
      const err = await claimJob(impatient, { ...lease, now: 10 }).catch((e: unknown) => e);
      expect(Date.now() - t0).toBeGreaterThanOrEqual(300);
      expect(err).toBeInstanceOf(DatabaseBusyError);
      expect((err as Error).message).toMatch(/busy .* while trying to claim a job/);
      // the lock is released within the retry budget: the claim goes through and is committed for everyone
      process.env.DB_BUSY_RETRY_MS = '5000';
      setTimeout(() => { void holder.commit(); }, 100);
      const got = await claimJob(impatient, { ...lease, now: 10 });
      expect(got).not.toBeNull();
      const rows = await db.select().from(jobs).where(eq(jobs.status, 'running'));
      expect(rows.map((r) => r.lockToken)).toEqual([got!.lockToken]);
      // and the connection is not left holding the lock: a transaction elsewhere can still write
      expect((await failJob(db, got!.id, got!.lockToken, { error: 'x', retryable: true, now: 20 })).outcome).toBe('retry');
    } finally {
      delete process.env.DB_BUSY_RETRY_MS;
      impatient.$client.close();
    }
  });

  it('recognises busy and locked errors through their cause chain only', () => {
    expect(isBusyError(new Error('x'))).toBe(false);
    expect(isBusyError(new Error('query failed', { cause: { code: 'SQLITE_BUSY' } }))).toBe(true);
    expect(isBusyError({ code: 'SQLITE_LOCKED_SHAREDCACHE' })).toBe(true);
    expect(isBusyError({ code: 'SQLITE_CONSTRAINT' })).toBe(false);
  });

  it('gives up on a busy transaction with the same clear error', async () => {
    const impatient = await openDbWithTimeout(t.url, 1);
    const holder = await t.db.$client.transaction('write');
    try {
      const err = await withBusyRetry('record something', () => impatient.transaction(async (tx) => tx.select().from(jobs)), { db: impatient, budgetMs: 150 })
        .catch((e: unknown) => e);
      expect(err).toBeInstanceOf(DatabaseBusyError);
    } finally {
      await holder.rollback();
      impatient.$client.close();
    }
    await enqueueJob(db, { kind: JOB_KINDS.probe }, 0);
  });
});

async function openDbWithTimeout(url: string, timeoutMs: number): Promise<Db> {
  const { createClient } = await import('@libsql/client');
  const { drizzle } = await import('drizzle-orm/libsql');
  const schema = await import('@/db/schema');
  return drizzle(createClient({ url, timeout: timeoutMs }), { schema }) as Db;
}
