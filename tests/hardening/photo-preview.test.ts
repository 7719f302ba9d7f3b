/**
 * A photo no preview can be made of answers 422 with the reason, never 500, and the check's detail says the
 * photo is not available and why — whether the detail or the photo is asked for first. The two photos: a JPEG
 * cut short (its scan ends before the EOI marker, ITU-T T.81 B.2.1) and a PNG whose IHDR declares
 * 20000 × 20000 px (ISO/IEC 15948 §11.2.2; chunk CRC as in its annex D, computed by node:zlib's crc32).
 */
import { crc32, deflateSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GET as detailGet } from '@/app/api/checks/[id]/detail/route';
import { GET as photoGet } from '@/app/api/checks/[id]/photo/route';
import { intakePhoto } from '@/lib/checks/intake';
import { createBed } from '@/lib/services/beds';
import { getStorage } from '@/lib/storage';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { noiseJpeg } from '@/tests/fixtures/make-bad-inputs';
import { call, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';

/** A PNG chunk: length, type, data, CRC-32 of type and data (ISO/IEC 15948 §5.3). */
function chunk(type: string, data: Buffer): Buffer {
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const len = Buffer.alloc(4); len.writeUInt32BE(data.length);
  const crc = Buffer.alloc(4); crc.writeUInt32BE(crc32(body));
  return Buffer.concat([len, body, crc]);
}

/** A PNG declaring `w`×`h` px of 8-bit RGB whose image data holds only its first row. */
function pngDeclaring(w: number, h: number): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(w, 0); ihdr.writeUInt32BE(h, 4);
  ihdr[8] = 8; ihdr[9] = 2; // bit depth 8, colour type 2 (RGB)
  const firstRow = Buffer.alloc(1 + w * 3, 0x80); firstRow[0] = 0; // filter type 0
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(firstRow)), chunk('IEND', Buffer.alloc(0))]);
}

let t: WebTestDb;
let cookie: string;
const checkIds: Record<string, string> = {};

beforeAll(async () => {
  t = await useFreshDatabase({ storage: true });
  const owner = await newOwner(t.db, 'Preview shop');
  cookie = await sessionCookie(t.db, owner);
  const bed = await createBed(t.db, owner, { name: 'Bed', pattern: SMALL_PATTERN });
  const jpeg = await noiseJpeg(640, 480);
  const photos = { truncated: jpeg.subarray(0, Math.floor(jpeg.length * 0.4)), huge: pngDeclaring(20000, 20000), fine: jpeg };
  for (const [name, bytes] of Object.entries(photos)) {
    const r = await intakePhoto(t.db, getStorage(), { workshopId: owner.workshopId, bedId: bed.id, userId: owner.user.id, source: bytes, referenceMm: 150 });
    checkIds[name] = r.check.id;
  }
});
afterAll(async () => { await t.close(); });

const photo = (id: string) => call(photoGet, { cookie, params: { id }, path: `/api/checks/${id}/photo` });
const detail = async (id: string) => (await call(detailGet, { cookie, params: { id } })).json as { photo: { available: boolean; reason: string | null } };

describe('photo previews that cannot be made', () => {
  it('a JPEG cut short: the detail says so first, the photo answers 422 with the same reason', async () => {
    const d = await detail(checkIds.truncated!);
    expect(d.photo).toMatchObject({ available: false });
    expect(d.photo.reason).toMatch(/cannot be decoded/);
    const r = await photo(checkIds.truncated!);
    expect(r.status).toBe(422);
    expect(r.json).toEqual({ error: { code: 'photo_unreadable', message: d.photo.reason } });
  });

  it('a PNG declaring 20000 × 20000 px: the photo answers 422 naming its size, then the detail says so', async () => {
    const r = await photo(checkIds.huge!);
    expect(r.status).toBe(422);
    const message = (r.json as { error: { code: string; message: string } }).error;
    expect(message.code).toBe('photo_unreadable');
    expect(message.message).toContain('20000 × 20000 px');
    expect((await detail(checkIds.huge!)).photo).toEqual({ available: false, reason: message.message, widthPx: null, heightPx: null });
  });

  it('a good photo stays available and is served', async () => {
    expect((await detail(checkIds.fine!)).photo).toMatchObject({ available: true, reason: null });
    const id = checkIds.fine!;
    const r = await photoGet(new Request(`http://gridproof.test/api/checks/${id}/photo`, { headers: { host: 'gridproof.test', cookie } }), { params: Promise.resolve({ id }) });
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toBe('image/jpeg');
  });
});
