/**
 * The advice a failed fit gives depends on what the person already did: whoever marked the reference corners by
 * hand is told to check them, not to mark them. Real migrated SQLite, the real measurement core, a claimed job.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { requestRefit } from '@/db/queries/checks';
import { claimJob, failJob } from '@/db/queries/jobs';
import { intakePhoto } from '@/lib/checks/intake';
import { PermanentJobError, runCheckRefit } from '@/lib/checks/run-analysis';
import { analyzePoints } from '@/lib/geometry/analyze';
import { makeScene } from '@/lib/geometry/synthetic';
import { LocalStorage } from '@/lib/storage';
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
