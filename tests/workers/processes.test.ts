/**
 * Real worker processes on one migrated database file (WAL), as several machines would share a libSQL
 * server. What a lease-based queue must guarantee (common practice): every job is finished exactly once,
 * even when a worker is killed in the middle of one.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { auditEvents, jobs } from '@/db/schema';
import { enqueueJob, getJob, JOB_KINDS } from '@/db/queries/jobs';
import { tempDb, type TempDb } from '../queue/helpers';
import { spawnWorker, stopWorker, type WorkerProc } from './spawn';

let t: TempDb;
const procs: WorkerProc[] = [];
beforeEach(async () => { t = await tempDb(); });
afterEach(async () => {
  for (const p of procs.splice(0)) { p.child.kill('SIGKILL'); await p.exited; }
  t.close();
});

const start = (env: Record<string, string>) => {
  const p = spawnWorker({ DATABASE_URL: t.url, STORAGE_DIR: `${t.dir}/storage`, ...env });
  procs.push(p);
  return p;
};

async function until(pred: () => Promise<boolean>, timeoutMs: number) {
  const t0 = Date.now();
  while (!(await pred())) {
    if (Date.now() - t0 > timeoutMs) throw new Error('timed out');
    await new Promise((r) => setTimeout(r, 50));
  }
}

async function probeFinishes(jobId: string) {
  return t.db.select().from(auditEvents).where(eq(auditEvents.targetId, jobId));
}

describe('two worker processes on one database', () => {
  it('finish every one of N jobs exactly once, sharing the work', async () => {
    const a = start({ WORKER_ID: 'worker-a', WORKER_LEASE_MS: '2000' });
    const b = start({ WORKER_ID: 'worker-b', WORKER_LEASE_MS: '2000' });
    await Promise.all([a.waitFor((l) => l.event === 'worker.ready'), b.waitFor((l) => l.event === 'worker.ready')]);
    const n = 24;
    const ids: string[] = [];
    for (let i = 0; i < n; i++) ids.push((await enqueueJob(t.db, { kind: JOB_KINDS.probe, payload: { delayMs: 40 } })).id);
    await until(async () => (await t.db.select().from(jobs).where(eq(jobs.status, 'done'))).length === n, 30_000);
    for (const id of ids) {
      const finishes = await probeFinishes(id);
      expect(finishes).toHaveLength(1);
      const job = await getJob(t.db, id);
      expect(job?.attempts).toBe(1);
    }
    const by = (w: string) => (a.lines.concat(b.lines)).filter((l) => l.event === 'job.done' && l.workerId === w).length;
    expect(by('worker-a') + by('worker-b')).toBe(n);
    expect(by('worker-a')).toBeGreaterThan(0);
    expect(by('worker-b')).toBeGreaterThan(0);
    // graceful stop: both exit 0 on SIGTERM
    expect((await stopWorker(a)).code).toBe(0);
    expect((await stopWorker(b)).code).toBe(0);
  });

  it('let another worker finish, exactly once, a job whose worker was killed mid-way', async () => {
    const slow = start({ WORKER_ID: 'slow', WORKER_LEASE_MS: '600', WORKER_TEST_DELAY_MS: '60000' });
    const job = await enqueueJob(t.db, { kind: JOB_KINDS.probe });
    await slow.waitFor((l) => l.event === 'job.start' && l.jobId === job.id);
    // it holds the lease and keeps renewing it while it works
    await new Promise((r) => setTimeout(r, 900));
    const held = await getJob(t.db, job.id);
    expect(held?.status).toBe('running');
    expect(held?.lockedBy).toBe('slow');
    expect(held!.leaseExpiresAt!).toBeGreaterThan(Date.now());
    slow.child.kill('SIGKILL');
    expect((await slow.exited).signal).toBe('SIGKILL');

    const rescuer = start({ WORKER_ID: 'rescuer', WORKER_LEASE_MS: '600' });
    await rescuer.waitFor((l) => l.event === 'job.done' && l.jobId === job.id);
    const done = await getJob(t.db, job.id);
    expect(done?.status).toBe('done');
    expect(done?.attempts).toBe(2);
    expect(done?.lockedBy).toBe('rescuer');
    const finishes = await probeFinishes(job.id);
    expect(finishes).toHaveLength(1);
    expect(JSON.parse(finishes[0]!.detailJson!)).toMatchObject({ workerId: 'rescuer', attempt: 2 });
  });

  it('finishes the job in hand before exiting on SIGTERM', async () => {
    const w = start({ WORKER_ID: 'polite', WORKER_LEASE_MS: '2000' });
    const job = await enqueueJob(t.db, { kind: JOB_KINDS.probe, payload: { delayMs: 700 } });
    await w.waitFor((l) => l.event === 'job.start');
    w.child.kill('SIGTERM');
    expect((await w.exited).code).toBe(0);
    expect((await getJob(t.db, job.id))?.status).toBe('done');
    expect(await probeFinishes(job.id)).toHaveLength(1);
  });

  it('fails a job of an unknown kind at once with a message, and keeps running', async () => {
    const w = start({ WORKER_ID: 'w', WORKER_LEASE_MS: '2000' });
    const bad = await enqueueJob(t.db, { kind: 'no.such.kind' as never });
    const good = await enqueueJob(t.db, { kind: JOB_KINDS.probe });
    await w.waitFor((l) => l.event === 'job.done' && l.jobId === good.id);
    const row = await getJob(t.db, bad.id);
    expect(row?.status).toBe('failed');
    expect(row?.attempts).toBe(1);
    expect(row?.lastError).toMatch(/does not know jobs of kind "no.such.kind"/);
  });
});
