/**
 * The worker process (`npm run worker`): claims jobs from the database named by DATABASE_URL and runs them.
 *
 * Environment:
 *   DATABASE_URL            libSQL URL (file:… or libsql://… / http://… shared by several processes)
 *   WORKER_CONCURRENCY      jobs at once in this process (default 1)
 *   WORKER_LEASE_MS         lease length, renewed every third of it (default 30000)
 *   WORKER_POLL_MS          pause when the queue is empty (default 1000)
 *   WORKER_SHUTDOWN_MS      how long SIGTERM waits for jobs in hand (default 30000)
 *   WORKER_ID               name in the jobs table (default host:pid)
 *   WORKER_TEST_DELAY_MS    tests only (ignored when NODE_ENV=production): pause inside each job
 *   storage: see lib/storage/index.ts (STORAGE_DIR or S3_*)
 *   mail: SMTP_* / MAIL_FROM (lib/mail/config.ts); MAIL_DELIVERY=0 turns the outbox loop off
 * The database must be migrated (`npm run db:migrate`); SIGTERM / SIGINT stop it gracefully.
 */
import { closeDb, getDb } from '@/db/client';
import { JOB_KINDS } from '@/db/queries/jobs';
import { startMailDelivery } from '@/lib/services/mail-delivery';
import { getStorage, LocalStorage } from '@/lib/storage';
import { runProbe } from './probe';
import { jsonLog, startWorker, type JobHandler } from './run';

function intEnv(name: string, fallback: number, min = 0): number {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  const v = Number(raw);
  if (!Number.isInteger(v) || v < min) {
    throw new Error(`${name} must be a whole number ≥ ${min} (got "${raw}")`);
  }
  return v;
}

const handlers: Record<string, JobHandler> = {
  [JOB_KINDS.probe]: runProbe,
  [JOB_KINDS.analyze]: async (ctx) => (await import('@/lib/checks/pipeline')).analyzeCheck(ctx),
  [JOB_KINDS.refit]: async (ctx) => (await import('@/lib/checks/fit')).refitCheck(ctx),
};

async function main() {
  const db = await getDb();
  const storage = getStorage();
  if (storage instanceof LocalStorage) {
    // temp files of puts cut off by a crash (an hour old: no put in progress takes that long)
    const swept = await storage.sweepTemp().catch(() => 0);
    if (swept) jsonLog('storage.swept', { files: swept });
  }
  // the outbox (report links, invitations, password resets): see lib/services/mail-delivery.ts
  const mail = await startMailDelivery(db, { log: jsonLog });
  // opencv-wasm and the analysis code load once per process, before the first job rather than inside it
  const t0 = performance.now();
  try {
    await (await import('@/lib/checks/pipeline')).warmAnalysis();
    jsonLog('worker.warm', { ms: Math.round(performance.now() - t0) });
  } catch (e) {
    jsonLog('worker.warm-failed', { error: e instanceof Error ? e.message : String(e) });
  }
  const worker = startWorker({
    db,
    storage,
    handlers,
    workerId: process.env.WORKER_ID || undefined,
    concurrency: intEnv('WORKER_CONCURRENCY', 1, 1),
    leaseMs: intEnv('WORKER_LEASE_MS', 30_000, 100),
    pollMs: intEnv('WORKER_POLL_MS', 1_000, 10),
    shutdownMs: intEnv('WORKER_SHUTDOWN_MS', 30_000, 0),
    testDelayMs: process.env.NODE_ENV === 'production' ? 0 : intEnv('WORKER_TEST_DELAY_MS', 0),
  });
  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    jsonLog('worker.signal', { workerId: worker.workerId, signal });
    void Promise.all([worker.stop(), mail?.stop()]).then(async () => { await closeDb(); process.exit(0); });
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));
  await worker.done;
}

main().catch((e: unknown) => {
  jsonLog('worker.fatal', { error: e instanceof Error ? e.message : String(e) });
  process.exit(1);
});
