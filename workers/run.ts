/**
 * The worker loop: claim a job, renew its lease while the handler works, record the outcome. Several loops
 * ("slots") may run in one process (`concurrency`), and any number of processes may share one database.
 *
 * - A claim is one atomic UPDATE with a fresh random token (db/queries/jobs.ts).
 * - The lease is renewed every third of its length; when a renewal finds the token gone (the lease ran out and
 *   another worker took the job) the handler is told (`assertHeld` throws) and whatever it tries to finish is
 *   refused by the token guard.
 * - Errors: `PermanentJobError` and input errors fail the job at once; anything else is retried with backoff
 *   (an `AnalysisLimitError`, a crash or limit of the analysis process, ends with its own words for the person).
 * - `stop()` (SIGTERM) stops claiming and waits for the jobs in hand, up to `shutdownMs`.
 */
import { hostname } from 'node:os';
import { setTimeout as delay } from 'node:timers/promises';
import type { Db } from '@/db/client';
import {
  claimJob, DatabaseBusyError, failJob, LeaseLostError, reapExhaustedJobs, renewLease, type ClaimedJob,
} from '@/db/queries/jobs';
import type { JobContext } from '@/lib/checks/run-analysis';
import { AnalysisLimitError, PermanentJobError } from '@/lib/checks/run-analysis';
import type { Storage } from '@/lib/storage';

export type JobHandler = (ctx: JobContext) => Promise<void>;

export interface WorkerOptions {
  db: Db;
  storage: Storage;
  handlers: Record<string, JobHandler>;
  workerId?: string;
  concurrency?: number;
  leaseMs?: number;
  pollMs?: number;
  shutdownMs?: number;
  testDelayMs?: number;
  log?: (event: string, fields?: Record<string, unknown>) => void;
}

export interface RunningWorker {
  workerId: string;
  /** Resolves once every slot has stopped. */
  done: Promise<void>;
  /** Stops claiming; resolves when the jobs in hand are finished (or `shutdownMs` passed). */
  stop: () => Promise<void>;
}

/** Waits `ms` milliseconds, or until `signal` aborts; resolves either way. */
const pause = (ms: number, signal: AbortSignal): Promise<void> =>
  delay(ms, undefined, { signal }).catch((e: unknown) => { if (!signal.aborted) throw e; });

/** JSON lines on stdout: one object per event, with the time in ms. */
export function jsonLog(event: string, fields: Record<string, unknown> = {}): void {
  process.stdout.write(`${JSON.stringify({ t: Date.now(), event, ...fields })}\n`);
}

/** A short, single-line description of an error for the job row and logs. */
function describe(e: unknown): string {
  if (e instanceof Error) return `${e.name === 'Error' ? '' : `${e.name}: `}${e.message}`.slice(0, 2000);
  return String(e).slice(0, 2000);
}

export function startWorker(opts: WorkerOptions): RunningWorker {
  const workerId = opts.workerId ?? `${hostname()}:${process.pid}`;
  const concurrency = Math.max(1, opts.concurrency ?? 1);
  const leaseMs = opts.leaseMs ?? 30_000;
  const pollMs = opts.pollMs ?? 1_000;
  const shutdownMs = opts.shutdownMs ?? 30_000;
  const log = opts.log ?? jsonLog;
  const stopping = new AbortController();
  let lastReap = 0;

  async function runOne(job: ClaimedJob): Promise<void> {
    const started = Date.now();
    let held = true;
    log('job.start', { workerId, jobId: job.id, kind: job.kind, attempt: job.attempts, checkId: job.checkId });
    const renewEvery = Math.max(50, Math.floor(leaseMs / 3));
    let renewing: Promise<void> = Promise.resolve();
    const timer = setInterval(() => {
      renewing = renewing.then(async () => {
        if (!held) return;
        try {
          if (!(await renewLease(opts.db, job.id, job.lockToken, leaseMs))) {
            held = false;
            log('job.lease-lost', { workerId, jobId: job.id });
          }
        } catch (e) {
          log('job.renew-error', { workerId, jobId: job.id, error: describe(e) });
        }
      });
    }, renewEvery);
    const ctx: JobContext = {
      db: opts.db,
      storage: opts.storage,
      job,
      testDelayMs: opts.testDelayMs ?? 0,
      assertHeld: () => { if (!held) throw new LeaseLostError(job.id); },
      log: (event, detail) => log(event, { workerId, jobId: job.id, ...detail }),
    };
    try {
      const handler = opts.handlers[job.kind];
      if (!handler) throw new PermanentJobError(`This worker does not know jobs of kind "${job.kind}"; update the worker.`);
      await handler(ctx);
      log('job.done', { workerId, jobId: job.id, kind: job.kind, ms: Date.now() - started });
    } catch (e) {
      if (e instanceof LeaseLostError) {
        log('job.abandoned', { workerId, jobId: job.id, reason: e.message });
        return;
      }
      const permanent = e instanceof PermanentJobError;
      const outcome = await failJob(opts.db, job.id, job.lockToken, {
        error: describe(e),
        retryable: !permanent,
        ...(permanent ? { finalMessage: e.message } : e instanceof AnalysisLimitError ? { finalMessage: e.finalMessage(job.attempts) } : {}),
      }).catch((err: unknown) => ({ outcome: 'error', error: describe(err) }));
      log('job.failed', { workerId, jobId: job.id, kind: job.kind, error: describe(e), ...outcome, ms: Date.now() - started });
    } finally {
      clearInterval(timer);
      await renewing;
    }
  }

  async function slot(n: number): Promise<void> {
    while (!stopping.signal.aborted) {
      try {
        const now = Date.now();
        if (n === 0 && now - lastReap > Math.max(leaseMs, 1000)) {
          lastReap = now;
          const reaped = await reapExhaustedJobs(opts.db, now);
          if (reaped) log('jobs.reaped', { workerId, count: reaped });
        }
        const job = await claimJob(opts.db, { workerId, leaseMs });
        if (!job) { await pause(pollMs, stopping.signal); continue; }
        await runOne(job);
      } catch (e) {
        // the database was unreachable or busy for too long: say so, wait, and try again
        log('worker.error', { workerId, error: describe(e), busy: e instanceof DatabaseBusyError });
        await pause(pollMs, stopping.signal);
      }
    }
  }

  log('worker.ready', { workerId, concurrency, leaseMs, pollMs });
  const done = Promise.all(Array.from({ length: concurrency }, (_, i) => slot(i))).then(() => undefined);

  return {
    workerId,
    done,
    stop: async () => {
      stopping.abort();
      let timer: NodeJS.Timeout | undefined;
      const timeout = new Promise<'timeout'>((r) => { timer = setTimeout(() => r('timeout'), shutdownMs); });
      const how = await Promise.race([done.then(() => 'drained' as const), timeout]);
      clearTimeout(timer);
      log('worker.stopped', { workerId, how });
    },
  };
}
