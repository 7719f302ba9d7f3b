/**
 * The work queue (table `jobs`), shared by every web and worker process on one database (a local SQLite file in
 * WAL mode or a libSQL server).
 *
 * Guarantees:
 * - `claimJob` takes one job with ONE atomic `UPDATE … WHERE id = (SELECT … LIMIT 1) RETURNING *` and writes a
 *   fresh random lock token; two claimers can never hold the same job at the same time.
 * - A claim lasts for a lease (`lease_expires_at`); the holder renews it while it works. A job whose lease ran
 *   out (its worker crashed or was killed) can be claimed again by anyone.
 * - `renewLease`, `completeJob` and `failJob` are guarded by the token: a worker that lost its lease (stale
 *   token) changes nothing. Results that must appear exactly once are written in the same transaction as the
 *   guarded finish (see `finishJobInTx`).
 * - A failed attempt is retried after an exponential backoff with jitter until `max_attempts` claims were made;
 *   then the job (and its check) is failed with a message a person can act on.
 *
 * Times are integer milliseconds since the Unix epoch (UTC). No sessions or cookies: the worker imports this.
 */
import { randomBytes, randomUUID } from 'node:crypto';
import { setTimeout as delay } from 'node:timers/promises';
import { and, asc, eq, sql, type SQL } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { checks, jobs } from '@/db/schema';

export type Job = typeof jobs.$inferSelect;
/** A transaction handed out by `db.transaction`. */
export type DbTx = Parameters<Parameters<Db['transaction']>[0]>[0];
/** The database or an open transaction on it. */
export type DbExecutor = Db | DbTx;

/** Job kinds the worker knows. */
export const JOB_KINDS = {
  /** Photo → detections → fit → report for one check. */
  analyze: 'check.analyze',
  /** Detections edited in review → fit → report (no vision). */
  refit: 'check.refit',
  /** Proves a worker is alive and measures the queue; finishing writes one audit event. */
  probe: 'worker.probe',
} as const;
export type JobKind = (typeof JOB_KINDS)[keyof typeof JOB_KINDS];

export const DEFAULT_MAX_ATTEMPTS = 4;
/** First retry waits about this long, ms; every further retry doubles it. */
export const BACKOFF_BASE_MS = 2_000;
/** No retry waits longer than this, ms. */
export const BACKOFF_MAX_MS = 5 * 60_000;

// ---------------------------------------------------------------------------------------------------------
// Busy / locked handling

/** The database stayed locked by another process for longer than we were willing to wait. */
export class DatabaseBusyError extends Error {
  constructor(what: string, waitedMs: number, cause: unknown) {
    super(`The database was busy (locked by another process) for ${Math.round(waitedMs)} ms while trying to ${what}; ` +
      'another process is probably holding a long write. Try again in a moment; if it persists, check for a stuck process.', { cause });
    this.name = 'DatabaseBusyError';
  }
}

/** True when `error` (or any error in its `cause` chain) is SQLite's SQLITE_BUSY or SQLITE_LOCKED. */
export function isBusyError(error: unknown): boolean {
  for (let e: unknown = error, depth = 0; e && depth < 6; depth++) {
    const rec = e as { code?: unknown; message?: unknown; cause?: unknown };
    if (typeof rec.code === 'string' && /^SQLITE_(BUSY|LOCKED)/.test(rec.code)) return true;
    if (typeof rec.message === 'string' && /SQLITE_(BUSY|LOCKED)|database is locked/.test(rec.message)) return true;
    e = rec.cause;
  }
  return false;
}

/**
 * Runs `fn`, retrying it on SQLITE_BUSY / SQLITE_LOCKED for up to `budgetMs` (short randomised pauses), then
 * throws a `DatabaseBusyError` that says what was being attempted. Other errors pass through at once.
 * `fn` must be safe to repeat (a whole statement or a whole transaction).
 *
 * On a local file, a statement that failed with SQLITE_BUSY is left un-reset by the libsql driver (0.5.x), and
 * its connection then keeps every later write of that connection uncommitted while holding the write lock. So
 * after a busy error on a file database the client's connections are reopened (`reconnect`) before the retry.
 */
export async function withBusyRetry<T>(what: string, fn: () => Promise<T>, opts: { db?: DbExecutor; budgetMs?: number } = {}): Promise<T> {
  const budgetMs = opts.budgetMs ?? Number(process.env.DB_BUSY_RETRY_MS ?? 3_000);
  const started = Date.now();
  for (let attempt = 0; ; attempt++) {
    try {
      return await fn();
    } catch (e) {
      if (!isBusyError(e)) throw e;
      await resetAfterBusy(opts.db);
      const waited = Date.now() - started;
      if (waited >= budgetMs) throw new DatabaseBusyError(what, waited, e);
      await delay(Math.min(25 * 2 ** attempt, 250) * (0.5 + Math.random()));
    }
  }
}

/** Reopens a local-file client's connections after SQLITE_BUSY (see `withBusyRetry`). */
export async function resetAfterBusy(db: DbExecutor | undefined): Promise<void> {
  const client = db && '$client' in db ? (db as Db).$client : undefined;
  if (client && client.protocol === 'file') await client.reconnect();
}

// ---------------------------------------------------------------------------------------------------------
// Backoff

/**
 * Delay before the next attempt after `attempts` claims failed, ms: base·2^(attempts−1), capped, with "full
 * jitter" on the upper half (a random value in [d/2, d]) so that retries of many jobs do not arrive together.
 * @param attempts claims made so far (≥ 1)
 * @param random a number in [0, 1) (injected in tests)
 */
export function backoffMs(attempts: number, random: number = Math.random(), baseMs = BACKOFF_BASE_MS, maxMs = BACKOFF_MAX_MS): number {
  const d = Math.min(maxMs, baseMs * 2 ** Math.max(0, attempts - 1));
  return Math.round(d / 2 + (d / 2) * random);
}

function backoffBaseFromEnv(): number {
  const v = Number(process.env.JOB_BACKOFF_BASE_MS);
  return Number.isFinite(v) && v >= 0 ? v : BACKOFF_BASE_MS;
}

// ---------------------------------------------------------------------------------------------------------
// Time

/**
 * "Now" for lease and due-time comparisons: the database's clock (ms) unless a test passes `now`. Judging leases
 * by one clock, the database's, keeps workers on machines whose clocks disagree from stealing live leases.
 */
export function nowSql(now?: number): SQL {
  return now === undefined ? sql`CAST(unixepoch('subsec') * 1000 AS INTEGER)` : sql`${now}`;
}

// ---------------------------------------------------------------------------------------------------------
// Enqueue / read

export interface EnqueueInput {
  kind: JobKind;
  checkId?: string | null;
  payload?: Record<string, unknown>;
  maxAttempts?: number;
  /** Earliest start, ms; now when absent. */
  runAt?: number;
}

/** Adds a job (inside the caller's transaction when given one), due at once by the database's clock unless `runAt`. */
export async function enqueueJob(db: DbExecutor, input: EnqueueInput, now?: number): Promise<Job> {
  const [row] = await db.insert(jobs).values({
    id: randomUUID(),
    kind: input.kind,
    checkId: input.checkId ?? null,
    payloadJson: JSON.stringify(input.payload ?? {}),
    maxAttempts: input.maxAttempts ?? DEFAULT_MAX_ATTEMPTS,
    runAt: input.runAt ?? nowSql(now),
    createdAt: nowSql(now),
    updatedAt: nowSql(now),
  }).returning();
  if (!row) throw new Error('enqueueJob: insert returned no row');
  return row;
}

export async function getJob(db: DbExecutor, id: string): Promise<Job | undefined> {
  const [row] = await db.select().from(jobs).where(eq(jobs.id, id)).limit(1);
  return row;
}

/** A check's jobs, oldest first. */
export async function jobsForCheck(db: DbExecutor, checkId: string): Promise<Job[]> {
  return db.select().from(jobs).where(eq(jobs.checkId, checkId)).orderBy(asc(jobs.createdAt));
}

// ---------------------------------------------------------------------------------------------------------
// Claim / lease

/** A job in the hands of one worker: the row plus the token that proves it. */
export interface ClaimedJob extends Job {
  lockToken: string;
}

export interface ClaimOptions {
  /** Who claims (host:pid or a test name), stored for people reading the table. */
  workerId: string;
  leaseMs: number;
  now?: number;
}

/** A fresh random lock token (128 bits, hex). */
export function newLockToken(): string {
  return randomBytes(16).toString('hex');
}

/**
 * Claims the next due job, or returns null when there is none. One atomic statement: the subquery picks the
 * oldest job that is queued and due, or running with an expired lease and attempts left; the UPDATE takes it
 * with a new token, a new lease and one more attempt.
 */
export async function claimJob(db: DbExecutor, opts: ClaimOptions): Promise<ClaimedJob | null> {
  const now = nowSql(opts.now);
  const token = newLockToken();
  const rows = await withBusyRetry('claim a job', () =>
    db.update(jobs)
      .set({
        status: 'running',
        lockToken: token,
        lockedBy: opts.workerId,
        leaseExpiresAt: sql`${now} + ${opts.leaseMs}`,
        attempts: sql`${jobs.attempts} + 1`,
        updatedAt: now,
      })
      .where(sql`${jobs.id} = (
        SELECT j.id FROM jobs j
        WHERE (j.status = 'queued' AND j.run_at <= ${now})
           OR (j.status = 'running' AND j.lease_expires_at < ${now} AND j.attempts < j.max_attempts)
        ORDER BY j.run_at LIMIT 1)`)
      .returning(), { db });
  const row = rows[0];
  if (!row) return null;
  return { ...row, lockToken: token };
}

/** Extends the lease of a job still held with `token`; false when the lease was lost (stop working on it). */
export async function renewLease(db: DbExecutor, jobId: string, token: string, leaseMs: number, now?: number): Promise<boolean> {
  const rows = await withBusyRetry('renew a job lease', () =>
    db.update(jobs)
      .set({ leaseExpiresAt: sql`${nowSql(now)} + ${leaseMs}`, updatedAt: nowSql(now) })
      .where(and(eq(jobs.id, jobId), eq(jobs.lockToken, token), eq(jobs.status, 'running')))
      .returning({ id: jobs.id }), { db });
  return rows.length === 1;
}

/**
 * Marks a job done inside the caller's transaction, guarded by the token. Returns false (and changes nothing)
 * when the token is stale; the caller must then roll back whatever else it wrote in that transaction.
 */
export async function finishJobInTx(tx: DbExecutor, jobId: string, token: string, now = Date.now()): Promise<boolean> {
  const rows = await tx.update(jobs)
    .set({ status: 'done', lockToken: null, leaseExpiresAt: null, lastError: null, finishedAt: now, updatedAt: now })
    .where(and(eq(jobs.id, jobId), eq(jobs.lockToken, token), eq(jobs.status, 'running')))
    .returning({ id: jobs.id });
  return rows.length === 1;
}

/** Marks a job done when it is still held with `token`; a stale worker's call is a no-op returning false. */
export async function completeJob(db: Db, jobId: string, token: string, now = Date.now()): Promise<boolean> {
  return withBusyRetry('finish a job', () => finishJobInTx(db, jobId, token, now), { db });
}

/** Thrown inside a result transaction when the job's token is stale, so that the transaction rolls back. */
export class LeaseLostError extends Error {
  constructor(jobId: string) {
    super(`job ${jobId} is no longer held by this worker (its lease ran out and another worker took it)`);
    this.name = 'LeaseLostError';
  }
}

export type FailOutcome =
  | { outcome: 'retry'; runAt: number; attempts: number }
  | { outcome: 'failed'; attempts: number; message: string }
  | { outcome: 'lost' };

export interface FailInput {
  /** What went wrong this time, for the job row (technical is fine). */
  error: string;
  /** False for errors that another attempt cannot fix (a photo without a square, a bad pattern). */
  retryable: boolean;
  /** What to tell the person when this is the end; defaults from `error`. */
  finalMessage?: string;
  now?: number;
  random?: number;
}

/**
 * Records a failed attempt of a job still held with `token`: schedules a retry after the backoff when the
 * error is retryable and attempts remain, else fails the job for good and its check with a message. The check
 * row follows the job in the same transaction. A stale token changes nothing (`lost`).
 */
export async function failJob(db: Db, jobId: string, token: string, input: FailInput): Promise<FailOutcome> {
  const now = input.now ?? Date.now();
  return withBusyRetry('record a failed job', () => db.transaction(async (tx) => {
    const [job] = await tx.select().from(jobs)
      .where(and(eq(jobs.id, jobId), eq(jobs.lockToken, token), eq(jobs.status, 'running'))).limit(1);
    if (!job) return { outcome: 'lost' } as const;
    if (input.retryable && job.attempts < job.maxAttempts) {
      const delay = backoffMs(job.attempts, input.random, backoffBaseFromEnv());
      const [row] = await tx.update(jobs)
        .set({ status: 'queued', runAt: sql`${nowSql(input.now)} + ${delay}`, lockToken: null, lockedBy: null, leaseExpiresAt: null, lastError: input.error, updatedAt: now })
        .where(eq(jobs.id, jobId)).returning({ runAt: jobs.runAt });
      const runAt = row?.runAt ?? now + delay;
      if (job.checkId) {
        await tx.update(checks)
          .set({ status: 'queued', stage: `waiting to retry (attempt ${job.attempts + 1} of ${job.maxAttempts})`, progress: 0, updatedAt: now })
          .where(eq(checks.id, job.checkId));
      }
      return { outcome: 'retry', runAt, attempts: job.attempts } as const;
    }
    const message = input.finalMessage ?? (input.retryable
      ? `The analysis failed ${job.attempts} times; last error: ${input.error}. Try again later, or upload another photo if it keeps failing.`
      : input.error);
    await failJobRow(tx, job, message, input.error, now);
    return { outcome: 'failed', attempts: job.attempts, message } as const;
  }), { db });
}

async function failJobRow(tx: DbExecutor, job: Job, message: string, lastError: string, now: number) {
  await tx.update(jobs)
    .set({ status: 'failed', lockToken: null, leaseExpiresAt: null, lastError, finishedAt: now, updatedAt: now })
    .where(eq(jobs.id, job.id));
  if (job.checkId) {
    await tx.update(checks)
      .set({ status: 'failed', stage: null, error: message, updatedAt: now, finishedAt: now })
      .where(eq(checks.id, job.checkId));
  }
}

/**
 * Fails the jobs whose worker vanished (lease expired) on their last allowed attempt, so that they do not stay
 * "running" for ever. Returns how many were failed. Any worker may call it; it is idempotent.
 */
export async function reapExhaustedJobs(db: Db, now?: number): Promise<number> {
  const abandoned = sql`${jobs.status} = 'running' AND ${jobs.leaseExpiresAt} < ${nowSql(now)} AND ${jobs.attempts} >= ${jobs.maxAttempts}`;
  // a plain read first: most of the time there is nothing to do, and no write lock is taken for nothing
  const [any] = await db.select({ id: jobs.id }).from(jobs).where(abandoned).limit(1);
  if (!any) return 0;
  return withBusyRetry('fail abandoned jobs', () => db.transaction(async (tx) => {
    const rows = await tx.select().from(jobs).where(abandoned);
    for (const job of rows) {
      const message = `The worker stopped in the middle of this analysis ${job.attempts} times (it may have run out of memory or been ` +
        'restarted). Try a photo with fewer megapixels (the whole bed and the square still in the frame), and upload it again.';
      await failJobRow(tx, job, message, job.lastError ?? 'lease expired on the last attempt', now ?? Date.now());
    }
    return rows.length;
  }), { db });
}
