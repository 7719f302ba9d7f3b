/**
 * The advice a failed analysis gives: whoever marked the reference corners by hand is told to check them, not to
 * mark them; a photo whose target the border cuts is told what to change in words. Real migrated SQLite, the real
 * measurement core and vision (a photo drawn by our renderer), a claimed job.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { getCheckById, requestRefit } from '@/db/queries/checks';
import { claimJob, failJob } from '@/db/queries/jobs';
import { intakePhoto } from '@/lib/checks/intake';
import { analysisDeps } from '@/lib/checks/pipeline';
import { AnalysisLimitError, PermanentJobError, runCheckAnalysis, runCheckRefit } from '@/lib/checks/run-analysis';
import { fitDeps } from '@/lib/checks/fit';
import { analyzePoints } from '@/lib/geometry/analyze';
import { ReportSchema } from '@/lib/geometry/contract';
import { buildLattice } from '@/lib/geometry/lattice';
import { patternToMm } from '@/lib/geometry/units';
import { makeScene } from '@/lib/geometry/synthetic';
import { LocalStorage } from '@/lib/storage';
import { ISSUE_ADVICE } from '@/lib/vision/advice';
import { synthesize } from '@/lib/vision/render';
import { degrade } from '@/lib/vision/render/degrade';
import { cutThroughTarget, SMALL_BED } from '../vision/scenes';
import { tempDb, type TempDb } from '../queue/helpers';
import { makeShop, SMALL_PATTERN } from './fixtures';

let t: TempDb;
let storeDir: string;
beforeEach(async () => {
  t = await tempDb();
  storeDir = mkdtempSync(join(tmpdir(), 'gridproof-hint-'));
});
afterEach(() => {
  t.close();
  rmSync(storeDir, { recursive: true, force: true });
});

describe('a re-fit of hand-marked detections that cannot be fitted', () => {
  it('tells the person to check the corners they marked, not to mark them', async () => {
    const shop = await makeShop(t.db, 'hint shop');
    const storage = new LocalStorage(storeDir);
    const plain = await sharp(Buffer.alloc(32 * 32 * 3, 200), { raw: { width: 32, height: 32, channels: 3 } }).png().toBuffer();
    const { check } = await intakePhoto(t.db, storage, { workshopId: shop.workshopId, bedId: shop.bedId, userId: shop.userId, source: plain, referenceMm: 150 });
    // three holes are too few for any lattice fit (the core needs at least eight matched)
    const scene = makeScene({ pattern: SMALL_PATTERN, seed: 3, missingFraction: 0, spuriousFraction: 0 });
    const detections = { ...scene.points, holes: scene.points.holes.slice(0, 3) };
    // the photo's own analysis fails first (a plain grey photo has no square), then the person marks points
    const first = await claimJob(t.db, { workerId: 'test', leaseMs: 60_000 });
    expect(first?.kind).toBe('check.analyze');
    await failJob(t.db, first!.id, first!.lockToken, { error: 'no square', retryable: false });
    await requestRefit(t.db, { workshopId: shop.workshopId, checkId: check.id, userId: shop.userId, detections, edits: { kind: 'marked by hand' } });
    const job = await claimJob(t.db, { workerId: 'test', leaseMs: 60_000 });
    expect(job?.kind).toBe('check.refit');

    const run = runCheckRefit(
      { db: t.db, storage, job: job!, assertHeld: () => undefined, testDelayMs: 0 },
      { analyze: (p, pat) => analyzePoints(p, pat), isInputError: () => false },
    );
    await expect(run).rejects.toBeInstanceOf(PermanentJobError);
    const message = await run.catch((e: Error) => e.message);
    expect(message).toMatch(/check the marked corners/i);
    expect(message).not.toMatch(/mark the reference square's corners by hand/i);
  });
});

describe('a check with measured distances', () => {
  it('fits them with the detections and shows each in the report with its residual', async () => {
    const shop = await makeShop(t.db, 'tape shop');
    const storage = new LocalStorage(storeDir);
    const plain = await sharp(Buffer.alloc(32 * 32 * 3, 190), { raw: { width: 32, height: 32, channels: 3 } }).png().toBuffer();
    const scene = makeScene({ pattern: SMALL_PATTERN, seed: 4, missingFraction: 0, spuriousFraction: 0, centreNoisePx: 0.05, square: { sizeMm: 80, x: 60, y: 350, angleDeg: 3 } });
    // dog A1 (100, 100) to dog D1 (388, 100): 288 mm nominal; the true length of the scene, read to ±0.2 mm.
    const lat = buildLattice(patternToMm(SMALL_PATTERN));
    const a = lat.positions.findIndex((q) => q.label === 'dog A1'), b = lat.positions.findIndex((q) => q.label === 'dog D1');
    const tr = scene.truth.trueXY;
    const mm = Math.hypot(tr[2 * b]! - tr[2 * a]!, tr[2 * b + 1]! - tr[2 * a + 1]!);
    const { check } = await intakePhoto(t.db, storage, { workshopId: shop.workshopId, bedId: shop.bedId, userId: shop.userId, source: plain, referenceMm: 80, distances: [{ from: 'dog A1', to: 'dog D1', mm, sigmaMm: 0.2 }] });
    const first = await claimJob(t.db, { workerId: 'test', leaseMs: 60_000 });
    await failJob(t.db, first!.id, first!.lockToken, { error: 'no square', retryable: false });
    await requestRefit(t.db, { workshopId: shop.workshopId, checkId: check.id, userId: shop.userId, detections: scene.points, edits: { kind: 'marked by hand' } });
    const job = await claimJob(t.db, { workerId: 'test', leaseMs: 60_000 });
    await runCheckRefit({ db: t.db, storage, job: job!, assertHeld: () => undefined, testDelayMs: 0 }, fitDeps);
    const row = await getCheckById(t.db, check.id);
    const report = ReportSchema.parse(JSON.parse(row!.reportJson!));
    expect(report.distances).toHaveLength(1);
    expect(report.distances![0]).toMatchObject({ from: 'dog A1', to: 'dog D1', mm, sigmaMm: 0.2, used: true });
    expect(Math.abs(report.distances![0]!.residualSigmas!)).toBeLessThan(3);
  });
});

describe('the analysis of a photo whose reference target is cut by the border', () => {
  it('fails the check with the target-cut advice in words and stores that verdict, instead of measuring from the mark', async () => {
    // the crop through the middle of the target keeps its orientation mark whole (a filled square a tenth of the
    // target's side, target.ts): measured from it, every length would be ten times off
    const { jpeg, truth } = await synthesize(SMALL_BED, { width: 1200, height: 900, supersample: 3, seed: 752, tiltDeg: 6 });
    const source = (await degrade(jpeg, cutThroughTarget(truth))).jpeg;
    const shop = await makeShop(t.db, 'cut shop', SMALL_BED);
    const storage = new LocalStorage(storeDir);
    const { check } = await intakePhoto(t.db, storage, { workshopId: shop.workshopId, bedId: shop.bedId, userId: shop.userId, source, referenceMm: truth.target.sizeMm });
    const job = await claimJob(t.db, { workerId: 'test', leaseMs: 60_000 });
    expect(job?.kind).toBe('check.analyze');
    const run = runCheckAnalysis({ db: t.db, storage, job: job!, assertHeld: () => undefined, testDelayMs: 0 }, analysisDeps);
    const error = await run.then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(PermanentJobError);
    expect((error as Error).message).toContain(ISSUE_ADVICE['target-cut']);
    const stored = await getCheckById(t.db, check.id);
    expect(JSON.parse(stored!.qualityJson!).issues.map((i: { code: string }) => i.code)).toEqual(['target-cut']);
    expect(stored!.reportJson ?? null).toBeNull();
  }, 60_000);
});

describe('an analysis stopped by a limit', () => {
  it('tells the user to upload a lighter photo, never to mark corners the upload form cannot take', () => {
    const message = new AnalysisLimitError('took longer than 120 s').finalMessage(3);
    expect(message).toMatch(/^The analysis took longer than 120 s, on the last of 3 attempts\. /);
    expect(message).toMatch(/fewer megapixels/);
    expect(message).not.toMatch(/by hand/i);
  });
});
