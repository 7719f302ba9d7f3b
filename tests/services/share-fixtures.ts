/**
 * Finished checks for the sharing, comment, fit and PDF tests, on a real migrated database: a bed made through
 * the beds use case, a photo row (with a telling original name, to prove it never leaks), and a check marked
 * done with a report. Reports come either from the measurement core run on a synthetic scene, or built by
 * hand from nominal positions plus chosen deviations (for the fit cases solved by hand).
 */
import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { getBed } from '@/db/queries/beds';
import { checks, photos } from '@/db/schema';
import { analyzePoints } from '@/lib/geometry';
import type { Pattern, Report, ReportPosition } from '@/lib/geometry/contract';
import { buildLattice } from '@/lib/geometry/lattice';
import { makeScene } from '@/lib/geometry/synthetic';
import { patternToMm } from '@/lib/geometry/units';
import type { Actor } from '@/lib/services/actor';
import { createBed } from '@/lib/services/beds';

/** Original file name of every fixture photo: the shared views must never show it. */
export const SECRET_PHOTO_NAME = 'IMG_4711_gps-51.5N.jpg';

/** A report by hand: each position measured at nominal + `dev[label]` (mm), tolerance `toleranceMm`. */
export function handReport(pattern: Pattern, dev: Record<string, [number, number]> = {}, opts: { missing?: string[] } = {}): Report {
  const lat = buildLattice(patternToMm(pattern));
  const positions: ReportPosition[] = lat.positions.map((p) => {
    const fam = lat.families[p.family]!;
    const d = dev[p.label] ?? [0, 0];
    const missing = opts.missing?.includes(p.label);
    const r = Math.hypot(d[0], d[1]);
    return {
      family: fam.id, col: p.col, row: p.row, label: p.label, panel: null, nominal: { x: p.x, y: p.y },
      measured: missing ? null : { x: p.x + d[0], y: p.y + d[1] }, deviation: missing ? null : { dx: d[0], dy: d[1], r },
      uncertaintyMm: missing ? null : 0.02, toleranceMm: fam.toleranceMm, verdict: missing ? 'missing' : r > fam.toleranceMm ? 'out' : 'in',
    };
  });
  const rs = positions.filter((p) => p.deviation).map((p) => p.deviation!.r);
  const out = positions.filter((p) => p.verdict === 'out').length;
  return {
    version: 1, units: 'mm', pattern: { name: pattern.name }, positions, unmatched: [{ x: 1234.5, y: 987.25 }], panels: [], seams: [],
    lattice: { rotationDeg: 0, scaleX: 1, scaleY: 1, squarenessDeg: 0, observed: true, uncertainty: { rotationDeg: 0.001, scaleX: 1e-5, scaleY: 1e-5, squarenessDeg: 0.001 } },
    camera: { focalPx: 3111.5, k1: -0.01, k2: 0.001, focalSource: 'exif', principalPoint: { x: 2016, y: 1512 } },
    diagnostics: { diameterRatio: 1, residualSigmaPx: 0.2, centreSigmaPx: 0.2, inFit: rs.length, squareSidePx: 450, cornerSigmaPx: 0.1, squareResidualPx: 0.05, hidden: 0 },
    summary: {
      matched: rs.length, missing: positions.length - rs.length, rmsMm: Math.sqrt(rs.reduce((a, b) => a + b * b, 0) / Math.max(1, rs.length)), maxMm: Math.max(0, ...rs),
      out, marginal: 0, verdict: out ? 'fail' : 'pass', sentence: out ? `Fail: ${out} positions out of tolerance.` : 'Pass: every position is within its tolerance.',
    },
  };
}

/** The measurement core's report of a synthetic photo of `pattern`. */
export function coreReport(pattern: Pattern, seed = 3): Report {
  const scene = makeScene({ pattern, seed, mmPerPx: 0.5, centreNoisePx: 0.05, square: { sizeMm: 150, x: 150, y: 330, angleDeg: 5 } });
  return analyzePoints(scene.points, pattern);
}

/** A bed with `pattern` in the actor's workshop and a done check carrying `report`. */
export async function finishedCheck(db: Db, actor: Actor, pattern: Pattern, report: Report, opts: { bedName?: string; title?: string } = {}): Promise<{ bedId: string; checkId: string; photoId: string }> {
  const bed = await createBed(db, actor, { name: opts.bedName ?? 'Router bed', pattern });
  const row = await getBed(db, actor.workshopId, bed.id);
  const photoId = crypto.randomUUID();
  const sha = randomBytes(32).toString('hex');
  await db.insert(photos).values({ id: photoId, workshopId: actor.workshopId, bedId: bed.id, sha256: sha, storageKey: `photos/${sha}`, contentType: 'image/jpeg', byteSize: 1000, widthPx: 4032, heightPx: 3024, originalName: SECRET_PHOTO_NAME, uploadedBy: actor.user.id });
  const checkId = crypto.randomUUID();
  const now = Date.now();
  await db.insert(checks).values({
    id: checkId, workshopId: actor.workshopId, bedId: bed.id, photoId, patternId: row!.currentPatternId!, title: opts.title ?? 'After surfacing', referenceMm: 150,
    status: 'done', progress: 1, reportJson: JSON.stringify(report), verdict: report.summary.verdict, rmsMm: report.summary.rmsMm, maxMm: report.summary.maxMm,
    createdBy: actor.user.id, createdAt: now, updatedAt: now, finishedAt: now,
  });
  return { bedId: bed.id, checkId, photoId };
}

/** Marks a check queued again (for the "not ready" answers). */
export async function requeue(db: Db, checkId: string): Promise<void> {
  await db.update(checks).set({ status: 'queued', reportJson: null }).where(eq(checks.id, checkId));
}
