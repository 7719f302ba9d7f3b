/**
 * Figures of the report and review reads on this machine, printed as one JSON object (no assertions):
 * the use cases behind the route handlers, in process (the handlers' wrapper reads the session through a
 * server-only module that a plain script cannot import), on a fresh migrated SQLite file with a finished check of a 1220 × 915 mm bed
 * (the measurement core's report of a seeded synthetic scene) and a 4000 × 3000 px photo in local storage.
 * - detail, report and CSV export (behind `GET /api/checks/{id}/detail`, `/report`, `/export`): median and
 *   p95 of 200 calls, ms, including JSON encoding of the answer.
 * - `GET /api/checks/{id}/photo`: the first call (decode, turn upright, resize, re-encode, store) and the
 *   median of 50 later calls (served from the stored copy), ms.
 * - `photoOverlay` (pairing detections with positions in the browser): median of 20 runs, ms, per bed size.
 * Run: npx tsx tests/bench/report-views.bench.ts
 */
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { eq } from 'drizzle-orm';
import { closeDb, getDb, migrateDb } from '@/db/client';
import { checks } from '@/db/schema';
import { intakePhoto } from '@/lib/checks/intake';
import { analyzePoints, presetById } from '@/lib/geometry';
import { makeScene } from '@/lib/geometry/synthetic';
import { photoOverlay } from '@/lib/report/overlay';
import { signUp } from '@/lib/services/auth';
import { createBed } from '@/lib/services/beds';
import { LocalStorage } from '@/lib/storage';

const dir = mkdtempSync(join(tmpdir(), 'gridproof-bench-views-'));
process.env.DATABASE_URL = `file:${join(dir, 'bench.db')}`;
process.env.STORAGE_DIR = join(dir, 'storage');
process.env.SESSION_SECRET ??= randomBytes(32).toString('hex');
const db = await getDb();
await migrateDb(db);

const { user, workshopId } = await signUp(db, { email: 'bench@example.test', password: 'bench bench bench', name: 'Bench', workshopName: 'Bench shop' });
const actor = { user, workshopId, role: 'owner' as const };
const pattern = presetById('in-3-quarter20-dogs')!.size({ bedWidthMm: 1220, bedHeightMm: 915 });
const bed = await createBed(db, actor, { name: 'Bench bed', pattern });
const photo = await sharp({ create: { width: 4000, height: 3000, channels: 3, background: { r: 150, g: 120, b: 90 } } }).jpeg({ quality: 90 }).toBuffer();
const storage = new LocalStorage(process.env.STORAGE_DIR);
const r = await intakePhoto(db, storage, { workshopId, bedId: bed.id, userId: user.id, source: photo, contentType: 'image/jpeg', name: 'bench.jpg', referenceMm: 150, corners: null, title: null, maxBytes: 50 * 1024 * 1024 });
const scene = makeScene({ pattern, seed: 3, tiltDeg: 6, centreNoisePx: 0.08, missingFraction: 0.02, spuriousFraction: 0.02 });
const report = analyzePoints(scene.points, pattern);
await db.update(checks).set({ status: 'done', reportJson: JSON.stringify(report), detectionsJson: JSON.stringify(scene.points), finishedAt: Date.now() }).where(eq(checks.id, r.check.id));

const { getCheckDetail, getDisplayPhoto, exportCheck } = await import('@/lib/services/check-views');
const { getCheckReport } = await import('@/lib/checks/api');
const id = r.check.id;
async function once(f: () => Promise<unknown>): Promise<number> {
  const t0 = performance.now();
  const v = await f();
  if (!(v instanceof Object) || !('bytes' in v)) JSON.stringify(v);
  return performance.now() - t0;
}
const pct = (xs: number[], q: number) => { const s = [...xs].sort((a, b) => a - b); return +s[Math.min(s.length - 1, Math.floor(q * s.length))]!.toFixed(2); };
async function series(f: () => Promise<unknown>, n: number) {
  const xs: number[] = [];
  for (let i = 0; i < n; i++) xs.push(await once(f));
  return { medianMs: pct(xs, 0.5), p95Ms: pct(xs, 0.95) };
}

const photoFirstMs = +(await once(() => getDisplayPhoto(db, storage, actor, id, 1600))).toFixed(1);
const out = {
  bench: 'report-views',
  positions: report.positions.length,
  detections: scene.points.holes.length,
  detail: await series(() => getCheckDetail(db, storage, actor, id), 200),
  report: await series(() => getCheckReport(db, actor, id), 200),
  exportCsv: await series(() => exportCheck(db, actor, id, 'csv', 'mm'), 200),
  photo: { firstMs: photoFirstMs, cached: await series(() => getDisplayPhoto(db, storage, actor, id, 1600), 50), sourcePx: '4000x3000' },
  overlay: [] as { bedMm: string; detections: number; medianMs: number }[],
};
for (const [w, hgt] of [[1220, 915], [2440, 1220]] as const) {
  const p = presetById('in-3-quarter20-dogs')!.size({ bedWidthMm: w, bedHeightMm: hgt });
  const sc = makeScene({ pattern: p, seed: 5, tiltDeg: 4, centreNoisePx: 0.08 });
  const rep = analyzePoints(sc.points, p);
  const xs: number[] = [];
  for (let i = 0; i < 20; i++) { const t0 = performance.now(); photoOverlay(rep, sc.points); xs.push(performance.now() - t0); }
  out.overlay.push({ bedMm: `${w}x${hgt}`, detections: sc.points.holes.length, medianMs: pct(xs, 0.5) });
}
process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
await closeDb();
rmSync(dir, { recursive: true, force: true });
