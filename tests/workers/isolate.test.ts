/**
 * A worker whose analysis fails alone: the worker loop in this process with real analysis processes
 * (workers/isolate.ts forks workers/analysis-child.ts under tsx) on a real migrated SQLite file and rendered
 * photos (lib/vision/render). Test-only misbehaviour of the analysis process comes from the job's payload
 * (`testHog`, honoured only outside production): an unbounded JS heap, unbounded native buffers, an endless
 * loop, an abort. Each such job fails with its reason in words after its attempts; the same loop then
 * measures an ordinary photo (or, after the endless loop, re-fits one), in a fresh analysis process. The time
 * limit has a loop of its own (3 s), so that the other jobs are not held to it on a busy machine.
 * Memory cap here 640 MB: an ordinary 1600 × 1200 px analysis peaks near 230 MB resident (bench:worker has
 * the 12 MP figure).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { eq } from 'drizzle-orm';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jobs } from '@/db/schema';
import { getCheckById, requestRefit } from '@/db/queries/checks';
import { jobsForCheck } from '@/db/queries/jobs';
import { intakePhoto } from '@/lib/checks/intake';
import { ReportSchema, type Pattern } from '@/lib/geometry/contract';
import { LocalStorage } from '@/lib/storage';
import { synthesize, type Truth } from '@/lib/vision/render';
import { workerHandlers } from '@/workers/handlers';
import { AnalysisPool } from '@/workers/isolate';
import { startWorker, type RunningWorker } from '@/workers/run';
import { makeShop, type Shop } from '../checks/fixtures';
import { tempDb, type TempDb } from '../queue/helpers';

/** 20 mm dog holes on a 96 mm grid (a common dog-hole grid, common practice). */
const PATTERN: Pattern = {
  version: 1, name: 'isolation test bed', units: 'mm', bed: { width: 960, height: 672 },
  families: [{ id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 48, y: 48 }, pitch: { x: 96, y: 96 }, count: { x: 10, y: 7 }, fit: { toleranceMm: 0.5 } }],
};
const MEMORY_MB = 640;
const TIMEOUT_MS = 3_000;

let t: TempDb;
let storeDir: string;
let storage: LocalStorage;
let shop: Shop;
let photo: { jpeg: Buffer; truth: Truth };
let measuredCheckId: string;
const events: { event: string; [k: string]: unknown }[] = [];
const log = (event: string, fields: Record<string, unknown> = {}) => { events.push({ event, ...fields }); };

beforeAll(async () => {
  process.env.JOB_BACKOFF_BASE_MS = '50';
  t = await tempDb();
  storeDir = mkdtempSync(join(tmpdir(), 'gridproof-isolate-store-'));
  storage = new LocalStorage(storeDir);
  shop = await makeShop(t.db, 'isolation shop', PATTERN);
  photo = await synthesize(PATTERN, { seed: 21, misplacedCount: 0, supersample: 2 });
});
afterAll(() => {
  delete process.env.JOB_BACKOFF_BASE_MS;
  t.close();
  rmSync(storeDir, { recursive: true, force: true });
});

/** One worker loop with its analysis pool, for the jobs of one describe block. */
function loop(timeoutMs: number) {
  const it = { pool: undefined as AnalysisPool | undefined, worker: undefined as RunningWorker | undefined };
  beforeAll(async () => {
    it.pool = new AnalysisPool({ memoryMb: MEMORY_MB, timeoutMs, log });
    await it.pool.warm();
    it.worker = startWorker({ db: t.db, storage, handlers: workerHandlers(it.pool), leaseMs: 2_000, pollMs: 20, log });
  });
  afterAll(async () => {
    await it.worker?.stop();
    await it.pool?.close();
  });
  return it;
}

/** Uploads the photo (a new check each time: intake reuses a check only for the same photo and size). */
async function queue(referenceMm: number, hog: string | null, maxAttempts: number): Promise<string> {
  const { check } = await intakePhoto(t.db, storage, { workshopId: shop.workshopId, bedId: shop.bedId, userId: shop.userId, source: photo.jpeg, referenceMm });
  const [job] = await jobsForCheck(t.db, check.id);
  await t.db.update(jobs).set({ maxAttempts, ...(hog ? { payloadJson: JSON.stringify({ testHog: hog }) } : {}) }).where(eq(jobs.id, job!.id));
  return check.id;
}

async function ended(checkId: string, timeoutMs = 40_000) {
  const t0 = Date.now();
  for (;;) {
    const c = await getCheckById(t.db, checkId);
    if (c && ['done', 'needs-review', 'failed'].includes(c.status)) return c;
    if (Date.now() - t0 > timeoutMs) throw new Error(`check still ${c?.status}; log: ${events.slice(-6).map((e) => JSON.stringify(e)).join(' ')}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('an analysis that fills memory or crashes', () => {
  const l = loop(120_000);

  it('that fills the JS heap is killed, retried, and its check fails with the memory cap in words', async () => {
    const before = l.pool!.pids();
    const id = await queue(150, 'heap', 2);
    const check = await ended(id);
    expect(check.status).toBe('failed');
    expect(check.error).toMatch(new RegExp(`^The analysis ran out of memory \\(cap ${MEMORY_MB} MB\\), on the last of 2 attempts\\. `));
    const [job] = await jobsForCheck(t.db, id);
    expect(job).toMatchObject({ status: 'failed', attempts: 2 });
    expect(job!.lastError).toContain(`ran out of memory (cap ${MEMORY_MB} MB)`);
    // the analysis process of the first attempt is gone
    for (const pid of before) expect(l.pool!.pids()).not.toContain(pid);
  });

  it.skipIf(process.platform !== 'linux')('that fills native memory (buffers outside the heap) is stopped by the resident-memory watch', async () => {
    const check = await ended(await queue(151, 'native', 1));
    expect(check.status).toBe('failed');
    expect(check.error).toMatch(new RegExp(`^The analysis ran out of memory \\(cap ${MEMORY_MB} MB\\)\\. `));
  });

  it('that aborts says its process stopped', async () => {
    const check = await ended(await queue(153, 'crash', 1));
    expect(check.status).toBe('failed');
    expect(check.error).toMatch(/^The analysis process stopped unexpectedly \(signal SIGABRT\)\. /);
  });

  it('leaves the same loop to measure the next photo, with its stages and quality relayed from the analysis process', async () => {
    const id = await queue(photo.truth.target.sizeMm, null, 1);
    const check = await ended(id);
    expect(check.error).toBeNull();
    expect(['done', 'needs-review']).toContain(check.status);
    const report = ReportSchema.parse(JSON.parse(check.reportJson!));
    expect(report.positions.length).toBe(70);
    // the photo-quality verdict, sent by vision inside the analysis process, was stored on the check
    expect(check.qualityJson).not.toBeNull();
    const stages = [...new Set(events.filter((e) => e.event === 'job.stage' && e.checkId === id).map((e) => e.stage))];
    expect(stages).toEqual(['reading photo', 'finding square', 'finding holes', 'fitting']);
    // one loop throughout: every job was claimed by this worker
    expect(new Set(events.filter((e) => e.event === 'job.start').map((e) => e.workerId))).toEqual(new Set([l.worker!.workerId]));
    measuredCheckId = id;
  });

  it('fails the job of an input error inside the analysis process at once, with vision\'s own words', async () => {
    const plain = await sharp({ create: { width: 800, height: 600, channels: 3, background: '#b0a890' } }).jpeg().toBuffer();
    const { check } = await intakePhoto(t.db, storage, { workshopId: shop.workshopId, bedId: shop.bedId, userId: shop.userId, source: plain, referenceMm: 150 });
    const end = await ended(check.id);
    expect(end.status).toBe('failed');
    const [job] = await jobsForCheck(t.db, check.id);
    expect(job!.attempts).toBe(1);
    expect(end.error).not.toMatch(/^The analysis (ran out|took|process)/);
    expect(end.error!.length).toBeGreaterThan(10);
  });
});

describe('an analysis that never ends', () => {
  const l = loop(TIMEOUT_MS);

  it('is killed at the time limit, and the loop then re-fits a check in a fresh analysis process', async () => {
    const t0 = Date.now();
    const check = await ended(await queue(152, 'spin', 1));
    expect(check.status).toBe('failed');
    expect(check.error).toMatch(new RegExp(`^The analysis took longer than ${TIMEOUT_MS / 1000} s\\. `));
    expect(Date.now() - t0).toBeGreaterThanOrEqual(TIMEOUT_MS);

    const measured = await getCheckById(t.db, measuredCheckId);
    await requestRefit(t.db, { workshopId: shop.workshopId, checkId: measuredCheckId, userId: shop.userId, detections: JSON.parse(measured!.detectionsJson!), edits: { kind: 'again' } });
    const refit = await ended(measuredCheckId);
    expect(refit.error).toBeNull();
    expect(['done', 'needs-review']).toContain(refit.status);
    expect(new Set(events.filter((e) => e.event === 'job.start' && e.checkId === measuredCheckId).map((e) => e.workerId)).has(l.worker!.workerId)).toBe(true);
  });
});
