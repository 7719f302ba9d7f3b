/**
 * Queue figures on this machine, printed as JSON (no assertions; see README):
 * - claim + finish throughput of one process on a WAL SQLite file, and of four connections claiming at once;
 * - two real worker processes draining N probe jobs: jobs/s and whether every job was finished exactly once.
 * Run: npx tsx tests/bench/queue.bench.ts [jobs=400]
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { setTimeout as delay } from 'node:timers/promises';
import { eq, sql } from 'drizzle-orm';
import { migrateDb, openDb } from '@/db/client';
import { auditEvents, jobs } from '@/db/schema';
import { claimJob, completeJob, enqueueJob, JOB_KINDS } from '@/db/queries/jobs';

const N = Number(process.argv[2] ?? 400);
const root = fileURLToPath(new URL('../..', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'gridproof-bench-q-'));
const url = `file:${join(dir, 'bench.db')}`;
const db = await openDb(url);
await migrateDb(db);

async function fill(n: number) {
  await db.delete(jobs);
  await db.transaction(async (tx) => { for (let i = 0; i < n; i++) await enqueueJob(tx, { kind: JOB_KINDS.probe }); });
}

// 1. one connection, claim then finish, one job at a time
await fill(N);
let t0 = performance.now();
for (;;) {
  const j = await claimJob(db, { workerId: 'bench', leaseMs: 60_000 });
  if (!j) break;
  await completeJob(db, j.id, j.lockToken);
}
const single = N / ((performance.now() - t0) / 1000);

// 2. four connections claiming at the same time
await fill(N);
const clients = await Promise.all([0, 1, 2, 3].map(() => openDb(url)));
const claimed: string[] = [];
t0 = performance.now();
await Promise.all(clients.map(async (c, k) => {
  for (;;) {
    const j = await claimJob(c, { workerId: `c${k}`, leaseMs: 60_000 });
    if (!j) break;
    claimed.push(j.id);
    await completeJob(c, j.id, j.lockToken);
  }
}));
const four = N / ((performance.now() - t0) / 1000);
clients.forEach((c) => c.$client.close());

// 3. two worker processes on probe jobs
await fill(N);
await db.delete(auditEvents);
const spawnWorker = (id: string) => spawn(process.execPath, ['--import', 'tsx', 'workers/worker.ts'], {
  cwd: root, stdio: ['ignore', 'pipe', 'inherit'],
  env: { ...process.env, DATABASE_URL: url, WORKER_ID: id, WORKER_POLL_MS: '20', WORKER_LEASE_MS: '5000', NODE_ENV: 'test', MAIL_DELIVERY: '0', STORAGE_DIR: join(dir, 'storage') },
});
const procs = [spawnWorker('a'), spawnWorker('b')];
await Promise.all(procs.map((p) => new Promise<void>((resolve) => {
  p.stdout.setEncoding('utf8').on('data', function onData(d: string) { if (d.includes('"worker.ready"')) { p.stdout.off('data', onData); resolve(); } });
})));
t0 = performance.now();
for (;;) {
  const [row] = await db.select({ n: sql<number>`count(*)` }).from(jobs).where(eq(jobs.status, 'done'));
  if (Number(row?.n) === N) break;
  await delay(20);
}
const twoProc = N / ((performance.now() - t0) / 1000);
await Promise.all(procs.map((p) => new Promise((r) => { p.on('exit', r); p.kill('SIGTERM'); })));
const finishes = await db.select({ target: auditEvents.targetId, n: sql<number>`count(*)` }).from(auditEvents).groupBy(auditEvents.targetId);
const byWorker = await db.select({ w: jobs.lockedBy, n: sql<number>`count(*)` }).from(jobs).groupBy(jobs.lockedBy);

console.log(JSON.stringify({
  bench: 'queue',
  jobs: N,
  claimFinishPerSecond: { oneConnection: Math.round(single), fourConnections: Math.round(four), twoWorkerProcesses: Math.round(twoProc) },
  fourConnectionsDistinctClaims: new Set(claimed).size,
  twoProcesses: {
    finishedExactlyOnce: finishes.length === N && finishes.every((f) => Number(f.n) === 1),
    byWorker: Object.fromEntries(byWorker.map((r) => [r.w ?? '?', Number(r.n)])),
  },
}));
db.$client.close();
rmSync(dir, { recursive: true, force: true });
