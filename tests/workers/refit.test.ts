/**
 * The re-fit path through a real worker process: edited detections (a seeded synthetic scene of the
 * measurement core, with known panel offsets) → `check.refit` job → report, positions and panels written once.
 * The truth is the scene's own panel offsets; the bound (0.1 mm at 0.05 px centre noise and 0.33 mm/px) is
 * our allowance, far above the fit's noise and far below the 0.6 mm offsets it must recover.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { checkPositions, panelResults } from '@/db/schema';
import { getCheckById, requestRefit } from '@/db/queries/checks';
import { jobsForCheck } from '@/db/queries/jobs';
import { intakePhoto } from '@/lib/checks/intake';
import { ReportSchema, type Pattern } from '@/lib/geometry/contract';
import { makeScene } from '@/lib/geometry/synthetic';
import { LocalStorage } from '@/lib/storage';
import { tempDb, type TempDb } from '../queue/helpers';
import { makeShop, twoPanelDogBed } from '../checks/fixtures';
import { spawnWorker, stopWorker, type WorkerProc } from './spawn';

const PATTERN: Pattern = twoPanelDogBed('two-panel test bed', { heightMm: 600, originYMm: 60, rows: 6, toleranceMm: 0.3 });

let t: TempDb;
let storeDir: string;
let worker: WorkerProc;
beforeAll(async () => {
  t = await tempDb();
  storeDir = mkdtempSync(join(tmpdir(), 'gridproof-refit-store-'));
  worker = spawnWorker({ DATABASE_URL: t.url, STORAGE_DIR: storeDir, WORKER_ID: 'refit-worker', WORKER_LEASE_MS: '3000' });
  await worker.waitFor((l) => l.event === 'worker.ready');
});
afterAll(async () => { await stopWorker(worker); t.close(); rmSync(storeDir, { recursive: true, force: true }); });

async function until<T>(f: () => Promise<T | undefined | false>, timeoutMs = 30_000): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await f();
    if (v) return v;
    if (Date.now() - t0 > timeoutMs) throw new Error(`timed out; worker said: ${worker.lines.slice(-5).map((l) => JSON.stringify(l)).join(' ')} ${worker.stderr.join('').slice(-1000)}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('re-fit by the worker', () => {
  it('fits edited detections, writes one result, and a second re-fit replaces it', async () => {
    const shop = await makeShop(t.db, 'refit shop', PATTERN);
    const plain = await sharp(Buffer.alloc(64 * 64 * 3, 200), { raw: { width: 64, height: 64, channels: 3 } }).png().toBuffer();
    const { check } = await intakePhoto(t.db, new LocalStorage(storeDir), {
      workshopId: shop.workshopId, bedId: shop.bedId, userId: shop.userId, source: plain, referenceMm: 150,
    });
    // the plain photo has no square: its analysis fails, and the machinist marks the points by hand
    const failed = await until(async () => { const c = await getCheckById(t.db, check.id); return c?.status === 'failed' && c; });
    expect(failed.error).toBeTruthy();

    const scene = makeScene({ pattern: PATTERN, seed: 7, panelShiftMm: 0.6, centreNoisePx: 0.05, cornerNoisePx: 0.05, missingFraction: 0, spuriousFraction: 0 });
    await requestRefit(t.db, { workshopId: shop.workshopId, checkId: check.id, userId: shop.userId, detections: scene.points, edits: { kind: 'marked by hand' } });
    const done = await until(async () => { const c = await getCheckById(t.db, check.id); return (c?.status === 'done' || c?.status === 'needs-review') && c; });
    const report = ReportSchema.parse(JSON.parse(done.reportJson!));
    expect(report.positions).toHaveLength(60);
    expect(done.editedBy).toBe(shop.userId);
    expect(JSON.parse(done.editsJson!)).toEqual({ kind: 'marked by hand' });
    expect(done.rmsMm).toBe(report.summary.rmsMm);
    expect(done.progress).toBe(1);

    // the recovered panel offsets against the scene's truth (panels in pattern order L, R)
    const truthL = { dx: scene.truth.panelDx[0]!, dy: scene.truth.panelDy[0]! };
    const truthR = { dx: scene.truth.panelDx[1]!, dy: scene.truth.panelDy[1]! };
    const L = report.panels.find((p) => p.id === 'L')!;
    const R = report.panels.find((p) => p.id === 'R')!;
    // relative offset between the panels is what one photo can observe whatever the datum
    expect(Math.abs((R.dx - L.dx) - (truthR.dx - truthL.dx))).toBeLessThan(0.1);
    expect(Math.abs((R.dy - L.dy) - (truthR.dy - truthL.dy))).toBeLessThan(0.1);

    const rows = await t.db.select().from(checkPositions).where(eq(checkPositions.checkId, check.id));
    expect(rows).toHaveLength(60);
    expect((await t.db.select().from(panelResults).where(eq(panelResults.checkId, check.id)))).toHaveLength(2);

    // a second re-fit of the same check leaves one result, not two
    await requestRefit(t.db, { workshopId: shop.workshopId, checkId: check.id, userId: shop.userId, detections: scene.points, edits: { kind: 'again' } });
    await until(async () => { const jobs = await jobsForCheck(t.db, check.id); return jobs.length === 3 && jobs.every((j) => j.status === 'done' || j.status === 'failed') && jobs; });
    expect(await t.db.select().from(checkPositions).where(eq(checkPositions.checkId, check.id))).toHaveLength(60);
    const jobs = await jobsForCheck(t.db, check.id);
    expect(jobs.map((j) => [j.kind, j.status])).toEqual([['check.analyze', 'failed'], ['check.refit', 'done'], ['check.refit', 'done']]);
  });
});
