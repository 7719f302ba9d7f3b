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
 *   WORKER_JOB_MEMORY_MB    memory cap of one analysis process, JS heap and resident set (default 1536)
 *   WORKER_JOB_TIMEOUT_MS   wall-clock limit of one job's analysis (default 120000)
 * Each analysis runs in an analysis process of its own (workers/isolate.ts), started once and reused; one that
 * crashes or passes a limit is killed and replaced, and only its job fails (retried, then failed with the
 * reason: "The analysis ran out of memory (cap 1536 MB)", "… took longer than 120 s").
 *   storage: see lib/storage/index.ts (STORAGE_DIR or S3_*)
 *   mail: SMTP_* / MAIL_FROM (lib/mail/config.ts); MAIL_DELIVERY=0 turns the outbox loop off
 * The database must be migrated (`npm run db:migrate`); SIGTERM / SIGINT stop it gracefully.
 */
import { closeDb, getDb } from '@/db/client';
import { startMailDelivery } from '@/lib/services/mail-delivery';
import { getStorage, LocalStorage } from '@/lib/storage';
import { workerHandlers } from './handlers';
import { AnalysisPool } from './isolate';
import { jsonLog, startWorker } from './run';

function intEnv(name: string, fallback: number, min = 0): number {
  const raw = process.env[name];
  if (raw === undefined || raw === '') return fallback;
  const v = Number(raw);
  if (!Number.isInteger(v) || v < min) {
    throw new Error(`${name} must be a whole number ≥ ${min} (got "${raw}")`);
  }
  return v;
}

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
  // opencv-wasm and the analysis code load once per analysis process, before the first job rather than inside it
  const pool = new AnalysisPool({
    memoryMb: intEnv('WORKER_JOB_MEMORY_MB', 1536, 128),
    timeoutMs: intEnv('WORKER_JOB_TIMEOUT_MS', 120_000, 100),
    log: jsonLog,
  });
  try {
    jsonLog('worker.warm', { ms: await pool.warm() });
  } catch (e) {
    jsonLog('worker.warm-failed', { error: e instanceof Error ? e.message : String(e) });
  }
  const worker = startWorker({
    db,
    storage,
    handlers: workerHandlers(pool),
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
    void Promise.all([worker.stop(), mail?.stop()]).then(async () => { await Promise.all([pool.close(), closeDb()]); process.exit(0); });
  };
  process.on('SIGTERM', () => stop('SIGTERM'));
  process.on('SIGINT', () => stop('SIGINT'));
  await worker.done;
}

main().catch((e: unknown) => {
  jsonLog('worker.fatal', { error: e instanceof Error ? e.message : String(e) });
  process.exit(1);
});
