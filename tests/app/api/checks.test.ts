/**
 * The checks API through its real route handlers, a real migrated SQLite file and a real local store.
 * Photos are encoded by sharp (an independent library). Error bodies follow the house shape
 * { error: { code, message, fields? } }.
 */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as uploadPost, GET as listGet } from '@/app/api/beds/[id]/checks/route';
import { GET as checkGet } from '@/app/api/checks/[id]/route';
import { GET as reportGet } from '@/app/api/checks/[id]/report/route';
import { GET as compareGet } from '@/app/api/checks/[id]/compare/[other]/route';
import { POST as refitPost } from '@/app/api/checks/[id]/refit/route';
import { eq } from 'drizzle-orm';
import { checks, photos } from '@/db/schema';
import { createBed } from '@/lib/services/beds';
import type { Actor } from '@/lib/services/actor';
import { addMember, call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';

let t: WebTestDb;
let owner: Actor;
let machinistCookie: string;
let reviewerCookie: string;
let otherCookie: string;
let bedId: string;
let otherBedId: string;
let jpeg: Buffer;

const cookieFor = (a: Actor) => sessionCookie(t.db, a);

beforeAll(async () => {
  t = await useFreshDatabase({ storage: true });
  owner = await newOwner(t.db, 'Checks shop');
  machinistCookie = await cookieFor(await addMember(t.db, owner.workshopId, 'machinist'));
  reviewerCookie = await cookieFor(await addMember(t.db, owner.workshopId, 'reviewer'));
  const other = await newOwner(t.db, 'Other shop');
  otherCookie = await cookieFor(other);
  bedId = (await createBed(t.db, owner, { name: 'Router bed', pattern: SMALL_PATTERN })).id;
  otherBedId = (await createBed(t.db, other, { name: 'Their bed', pattern: SMALL_PATTERN })).id;
  jpeg = await sharp(Buffer.alloc(80 * 60 * 3, 120), { raw: { width: 80, height: 60, channels: 3 } }).jpeg().toBuffer();
});
afterAll(async () => { await t.close(); });

function uploadRequest(cookie: string, fields: Record<string, string | Blob>): Request {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) {
    if (typeof v === 'string') form.append(k, v);
    else form.append(k, v, 'bed.jpg');
  }
  return new Request('http://gridproof.test/api/beds/x/checks', { method: 'POST', headers: { cookie, host: 'gridproof.test' }, body: form });
}

async function upload(cookie: string, bed: string, fields: Record<string, string | Blob>) {
  const res = await uploadPost(uploadRequest(cookie, fields), { params: Promise.resolve({ id: bed }) });
  return { status: res.status, json: (await res.json()) as Record<string, unknown> & { error?: { code: string; message: string; fields?: Record<string, string> } } };
}

const photoBlob = () => new Blob([new Uint8Array(jpeg)], { type: 'image/jpeg' });

describe('checks API', () => {
  let checkId: string;

  it('queues a check for a machinist\'s photo (202) and reports it as queued', async () => {
    const r = await upload(machinistCookie, bedId, { photo: photoBlob(), referenceMm: '150' });
    expect(r.status).toBe(202);
    const check = r.json.check as { id: string; status: string };
    expect(check.status).toBe('queued');
    checkId = check.id;
    const s = await call(checkGet, { cookie: machinistCookie, params: { id: checkId } });
    expect(s.status).toBe(200);
    expect(s.json).toMatchObject({ check: { id: checkId, status: 'queued', progress: 0 } });
  });

  it('answers the same photo uploaded twice with the same check and one photo', async () => {
    const r = await upload(machinistCookie, bedId, { photo: photoBlob(), referenceMm: '150' });
    expect(r.status).toBe(202);
    expect((r.json.check as { id: string }).id).toBe(checkId);
    expect(r.json).toMatchObject({ photo: { duplicate: true }, reused: true });
    expect(await t.db.select().from(photos)).toHaveLength(1);
  });

  it('answers 409 for the report until the check is done', async () => {
    const r = await call(reportGet, { cookie: machinistCookie, params: { id: checkId } });
    expect(r.status).toBe(409);
    expect(r.json).toMatchObject({ error: { code: 'not_ready' } });
  });

  it('lists the bed\'s checks, newest first', async () => {
    const r = await call(listGet, { cookie: reviewerCookie, params: { id: bedId } });
    expect(r.status).toBe(200);
    expect((r.json as { checks: { id: string }[] }).checks.map((c) => c.id)).toEqual([checkId]);
  });

  it('refuses a reviewer\'s upload', async () => {
    const r = await upload(reviewerCookie, bedId, { photo: photoBlob(), referenceMm: '150' });
    expect(r.status).toBe(403);
    expect(r.json.error?.code).toBe('forbidden');
  });

  it("treats another workshop's bed and check as not found", async () => {
    expect((await upload(otherCookie, bedId, { photo: photoBlob(), referenceMm: '150' })).status).toBe(404);
    expect((await upload(machinistCookie, otherBedId, { photo: photoBlob(), referenceMm: '150' })).status).toBe(404);
    expect((await call(checkGet, { cookie: otherCookie, params: { id: checkId } })).status).toBe(404);
    expect((await call(reportGet, { cookie: otherCookie, params: { id: checkId } })).status).toBe(404);
    expect((await call(listGet, { cookie: otherCookie, params: { id: bedId } })).status).toBe(404);
    expect((await call(compareGet, { cookie: otherCookie, params: { id: checkId, other: checkId } })).status).toBe(404);
  });

  it('refuses anonymous callers', async () => {
    const res = await uploadPost(new Request('http://gridproof.test/api/beds/x/checks', { method: 'POST', headers: { host: 'gridproof.test' }, body: new FormData() }),
      { params: Promise.resolve({ id: bedId }) });
    expect(res.status).toBe(401);
  });

  it('names the field when the reference size or the corners are wrong', async () => {
    const r = await upload(machinistCookie, bedId, { photo: photoBlob() });
    expect(r.status).toBe(422);
    expect(Object.keys(r.json.error?.fields ?? {})).toContain('referenceMm');
    const c = await upload(machinistCookie, bedId, { photo: photoBlob(), referenceMm: '150', corners: '[[1,2],[3,4]]' });
    expect(c.status).toBe(422);
    expect(c.json.error?.fields?.corners).toMatch(/four \[x, y\] pixel pairs/);
    const p = await upload(machinistCookie, bedId, { referenceMm: '150' });
    expect(p.json.error?.fields?.photo).toBeDefined();
  });

  it('stores measured distances given with the upload, as a new check of the same photo', async () => {
    const distances = [{ from: 'dog A1', to: 'dog D3', mm: 339.4, sigmaMm: 0.3 }];
    const r = await upload(machinistCookie, bedId, { photo: photoBlob(), referenceMm: '150', distances: JSON.stringify(distances) });
    expect(r.status).toBe(202);
    expect(r.json).toMatchObject({ reused: false, photo: { duplicate: true } });
    const [row] = await t.db.select().from(checks).where(eq(checks.id, (r.json.check as { id: string }).id));
    expect(JSON.parse(row!.distancesJson!)).toEqual(distances);
  });

  it('names the distances field for a list it cannot read or a label the bed does not have', async () => {
    const bad = await upload(machinistCookie, bedId, { photo: photoBlob(), referenceMm: '150', distances: '[{"from": "dog A1"}' });
    expect(bad.status).toBe(422);
    expect(bad.json.error?.fields?.distances).toMatch(/JSON list/);
    const neg = await upload(machinistCookie, bedId, { photo: photoBlob(), referenceMm: '150', distances: '[{"from": "dog A1", "to": "dog B1", "mm": -3, "sigmaMm": 0.2}]' });
    expect(neg.json.error?.fields?.distances).toMatch(/^Distance 1: mm /);
    const label = await upload(machinistCookie, bedId, { photo: photoBlob(), referenceMm: '150', distances: '[{"from": "dog A1", "to": "insert Z9", "mm": 300, "sigmaMm": 0.2}]' });
    expect(label.status).toBe(422);
    expect(label.json.error?.fields?.distances).toMatch(/no position "insert Z9"/);
  });

  it('refuses a text file named .jpg (415) and an oversize photo (413), keeping nothing', async () => {
    const before = readdirSync(join(t.storeDir, 'photos', owner.workshopId)).length;
    const txt = await upload(machinistCookie, bedId, { photo: new Blob(['just some words, not a photo'], { type: 'image/jpeg' }), referenceMm: '150' });
    expect(txt.status).toBe(415);
    expect(txt.json.error?.code).toBe('unsupported_media_type');
    process.env.UPLOAD_MAX_BYTES = String(jpeg.length - 1);
    try {
      const big = await upload(machinistCookie, bedId, { photo: photoBlob(), referenceMm: '120' });
      expect(big.status).toBe(413);
      expect(big.json.error?.message).toMatch(/limit/);
    } finally {
      delete process.env.UPLOAD_MAX_BYTES;
    }
    expect(readdirSync(join(t.storeDir, 'photos', owner.workshopId)).length).toBe(before);
    expect(readdirSync(join(t.storeDir, '.tmp'))).toEqual([]);
  });

  it('keeps nothing of an upload cut off half way through the photo', async () => {
    const form = new FormData();
    form.append('referenceMm', '150');
    form.append('photo', new Blob([new Uint8Array(Buffer.concat([jpeg, Buffer.alloc(50_000, 9)]))], { type: 'image/jpeg' }), 'cut.jpg');
    const whole = new Request('http://gridproof.test/', { method: 'POST', body: form });
    const type = whole.headers.get('content-type')!;
    const bytes = Buffer.from(await whole.arrayBuffer());
    const cut = bytes.subarray(0, bytes.length - 20_000);
    const before = readdirSync(join(t.storeDir, 'photos', owner.workshopId)).length;
    const res = await uploadPost(new Request('http://gridproof.test/api/beds/x/checks', {
      method: 'POST', headers: { cookie: machinistCookie, host: 'gridproof.test', 'content-type': type }, body: cut,
    }), { params: Promise.resolve({ id: bedId }) });
    expect(res.status).toBe(422);
    expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/cut off/);
    expect(readdirSync(join(t.storeDir, 'photos', owner.workshopId)).length).toBe(before);
    expect(readdirSync(join(t.storeDir, '.tmp'))).toEqual([]);
  });

  it('refuses a re-fit while the check is still queued, and a reviewer cannot re-fit', async () => {
    const detections = {
      image: { width: 80, height: 60 }, reference: { sizeMm: 150, corners: [[1, 1], [20, 1], [20, 20], [1, 20]] }, holes: [{ x: 30, y: 30, diameterPx: 4 }],
    };
    const busy = await call(refitPost, { cookie: machinistCookie, params: { id: checkId }, body: { detections } });
    expect(busy.status).toBe(409);
    const reviewer = await call(refitPost, { cookie: reviewerCookie, params: { id: checkId }, body: { detections } });
    expect(reviewer.status).toBe(403);
  });
});
