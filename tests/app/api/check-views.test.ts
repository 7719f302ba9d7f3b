/**
 * The report and review read routes (detail, photo display copy, export) through their real handlers, a real
 * migrated SQLite file and a real local store. The photo carries EXIF written by sharp (an independent
 * library) and is read back with exifr (another): the display copy must carry none of it.
 */
import exifr from 'exifr';
import sharp from 'sharp';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as uploadPost } from '@/app/api/beds/[id]/checks/route';
import { GET as detailGet } from '@/app/api/checks/[id]/detail/route';
import { GET as photoGet } from '@/app/api/checks/[id]/photo/route';
import { GET as exportGet } from '@/app/api/checks/[id]/export/route';
import { checks } from '@/db/schema';
import { analyzePoints } from '@/lib/geometry';
import { makeScene } from '@/lib/geometry/synthetic';
import { createBed } from '@/lib/services/beds';
import type { Actor } from '@/lib/services/actor';
import { addMember, call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';
import { SMALL_PATTERN, twoPanelDogBed } from '@/tests/checks/fixtures';

let t: WebTestDb;
let owner: Actor;
let reviewerCookie: string;
let otherCookie: string;
let checkId: string;

const cookieFor = (a: Actor) => sessionCookie(t.db, a);

beforeAll(async () => {
  t = await useFreshDatabase({ storage: true });
  owner = await newOwner(t.db, 'Views shop');
  reviewerCookie = await cookieFor(await addMember(t.db, owner.workshopId, 'reviewer'));
  otherCookie = await cookieFor(await newOwner(t.db, 'Other shop'));
  const bedId = (await createBed(t.db, owner, { name: 'Router bed', pattern: SMALL_PATTERN })).id;
  // 120 × 80 px landscape stored with EXIF orientation 6 (shown turned 90° clockwise) and a GPS position.
  const jpeg = await sharp({ create: { width: 120, height: 80, channels: 3, background: { r: 90, g: 100, b: 110 } } })
    .withExif({ IFD0: { Make: 'TestCam', Model: 'Serial 12345' }, IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1' } })
    .withMetadata({ orientation: 6 })
    .jpeg()
    .toBuffer();
  const before = await exifr.parse(jpeg, { gps: true, tiff: true });
  expect(before?.Make).toBe('TestCam');
  const form = new FormData();
  form.append('photo', new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' }), 'bed.jpg');
  form.append('referenceMm', '150');
  const res = await uploadPost(new Request('http://gridproof.test/api/beds/x/checks', { method: 'POST', headers: { cookie: await cookieFor(owner), host: 'gridproof.test' }, body: form }), { params: Promise.resolve({ id: bedId }) });
  expect(res.status).toBe(202);
  checkId = ((await res.json()) as { check: { id: string } }).check.id;
});
afterAll(async () => { await t.close(); });

describe('check read routes', () => {
  it('serves members an upright display copy of the photo with no metadata', async () => {
    const r = await photoGet(new Request(`http://gridproof.test/api/checks/${checkId}/photo`, { headers: { cookie: reviewerCookie, host: 'gridproof.test' } }), { params: Promise.resolve({ id: checkId }) });
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toBe('image/jpeg');
    expect(r.headers.get('cache-control')).toContain('private');
    const bytes = Buffer.from(await r.arrayBuffer());
    const meta = await sharp(bytes).metadata();
    // orientation 6 turned upright: 120 × 80 becomes 80 × 120
    expect([meta.width, meta.height]).toEqual([80, 120]);
    expect(meta.exif).toBeUndefined();
    expect(meta.orientation).toBeUndefined();
    expect(await exifr.parse(bytes, { gps: true, tiff: true })).toBeUndefined();
    // answered again from the stored copy, revalidated by its ETag
    const again = await photoGet(new Request(`http://gridproof.test/api/checks/${checkId}/photo`, { headers: { cookie: reviewerCookie, host: 'gridproof.test', 'if-none-match': r.headers.get('etag')! } }), { params: Promise.resolve({ id: checkId }) });
    expect(again.status).toBe(304);
  });

  it('refuses the photo to anyone signed out and hides it from another workshop', async () => {
    const anon = await call(photoGet, { params: { id: checkId } });
    expect(anon.status).toBe(401);
    const other = await call(photoGet, { cookie: otherCookie, params: { id: checkId } });
    expect(other.status).toBe(404);
    expect(other.json).toMatchObject({ error: { code: 'not_found' } });
  });

  it('gives the pattern in mm and no detections before the analysis', async () => {
    const r = await call(detailGet, { cookie: reviewerCookie, params: { id: checkId } });
    expect(r.status).toBe(200);
    const d = r.json as { pattern: { units: string; bed: { width: number } }; detections: unknown; can: { review: boolean }; check: { bedName: string } };
    expect(d.pattern.units).toBe('mm');
    expect(d.pattern.bed.width).toBe(500);
    expect(d.detections).toBeNull();
    expect(d.can.review).toBe(false);
    expect(d.check.bedName).toBe('Router bed');
  });

  it('exports 409 until there is a report, then CSV in the asked unit and the JSON report', async () => {
    const early = await call(exportGet, { cookie: reviewerCookie, params: { id: checkId }, path: `/api/checks/${checkId}/export` });
    expect(early.status).toBe(409);
    const scene = makeScene({ pattern: SMALL_PATTERN, seed: 2, mmPerPx: 0.5, centreNoisePx: 0.05, square: { sizeMm: 150, x: 150, y: 330, angleDeg: 5 } });
    const report = analyzePoints(scene.points, SMALL_PATTERN);
    await t.db.update(checks).set({ status: 'done', reportJson: JSON.stringify(report), detectionsJson: JSON.stringify(scene.points) }).where(eq(checks.id, checkId));
    const res = await exportGet(new Request(`http://gridproof.test/api/checks/${checkId}/export?format=csv&units=in`, { headers: { cookie: reviewerCookie, host: 'gridproof.test' } }), { params: Promise.resolve({ id: checkId }) });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="gridproof-router-bed-.*\.csv"$/);
    const lines = (await res.text()).split('\r\n');
    expect(lines[0]).toMatch(/^label,family,col,row,panel,nominal_x_in,/);
    expect(lines).toHaveLength(report.positions.length + 2);
    // the first dog sits at (100, 100) mm = (3.93701, 3.93701) in
    expect(lines.find((l) => l.startsWith('dog A1,'))).toContain(',3.93701,3.93701,');
    const js = await call(exportGet, { cookie: reviewerCookie, params: { id: checkId }, path: `/api/checks/${checkId}/export?format=json` });
    expect(js.status).toBe(200);
    expect(js.json).toMatchObject({ version: 1, units: 'mm', summary: { matched: report.summary.matched } });
  });
  it('exports the panels as CSV, one row a panel in the asked unit, with the move that puts each back', async () => {
    // two panels, each shifted by up to 0.6 mm: the scene's own truth is what the CSV must carry
    const pattern = twoPanelDogBed('two-panel export bed', { heightMm: 600, originYMm: 60, rows: 6, toleranceMm: 0.3 });
    const scene = makeScene({ pattern, seed: 7, panelShiftMm: 0.6, centreNoisePx: 0.05, cornerNoisePx: 0.05, missingFraction: 0, spuriousFraction: 0 });
    const report = analyzePoints(scene.points, pattern);
    await t.db.update(checks).set({ status: 'done', reportJson: JSON.stringify(report) }).where(eq(checks.id, checkId));
    const res = await exportGet(new Request(`http://gridproof.test/api/checks/${checkId}/export?format=panels-csv&units=in`, { headers: { cookie: reviewerCookie, host: 'gridproof.test' } }), { params: Promise.resolve({ id: checkId }) });
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="gridproof-router-bed-.*-panels-\d{4}-\d{2}-\d{2}\.csv"$/);
    const lines = (await res.text()).split('\r\n');
    expect(lines[0]).toBe('panel,dx_in,dy_in,rotation_deg,uncertainty_1sigma_in,rotation_uncertainty_1sigma_deg,positions,move_x_in,move_y_in,turn_deg,verdict,correction');
    expect(lines).toHaveLength(2 + 1 + 1); // header, L, R, and the final CRLF's empty line (RFC 4180)
    const rows = new Map(lines.slice(1, 3).map((l) => { const c = l.split(','); return [c[0]!, c] as const; }));
    const num = (id: string, k: number) => Number(rows.get(id)![k]);
    // what one photo observes whatever the datum: the offset of R from L, within 0.1 mm of the truth, in
    // inches of 25.4 mm (the international inch)
    for (const [k, truth] of [[1, scene.truth.panelDx], [2, scene.truth.panelDy]] as const) {
      expect(Math.abs((num('R', k) - num('L', k)) - (truth[1]! - truth[0]!) / 25.4)).toBeLessThan(0.1 / 25.4);
    }
    for (const id of ['L', 'R']) {
      // the move back is the offset reversed, the turn the rotation reversed
      expect(num(id, 7)).toBeCloseTo(-num(id, 1), 5);
      expect(num(id, 8)).toBeCloseTo(-num(id, 2), 5);
      expect(num(id, 9)).toBeCloseTo(-num(id, 3), 4);
      // placed from the holes seen on it: at most its 5 × 6, fewer where the reference square covers some
      expect(num(id, 6)).toBe(report.positions.filter((p) => p.panel === id && p.measured).length);
      expect(num(id, 6)).toBeLessThanOrEqual(30);
      expect(['reseat', 'in-place', 'not-placed']).toContain(rows.get(id)![10]);
    }
    // in the reader's own unit when none is asked for (a new member works in mm), and hidden from another workshop
    const mm = await exportGet(new Request(`http://gridproof.test/api/checks/${checkId}/export?format=panels-csv`, { headers: { cookie: reviewerCookie, host: 'gridproof.test' } }), { params: Promise.resolve({ id: checkId }) });
    expect(mm.status).toBe(200);
    const mmLines = (await mm.text()).split('\r\n');
    expect(mmLines[0]).toMatch(/^panel,dx_mm,dy_mm,/);
    // the same offsets, 25.4 mm to the inch, to the inch column's last place
    expect(Number(mmLines.find((l) => l.startsWith('R,'))!.split(',')[1]) / 25.4).toBeCloseTo(num('R', 1), 4);
    const other = await call(exportGet, { cookie: otherCookie, params: { id: checkId }, path: `/api/checks/${checkId}/export?format=panels-csv` });
    expect(other.status).toBe(404);
  });
});
