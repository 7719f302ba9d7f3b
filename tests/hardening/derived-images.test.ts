/**
 * Uploaded originals stay with the workshop: the photo route serves only a derived display copy, only to
 * members (another workshop gets 404, no session 401), and that copy carries no EXIF at all — no GPS
 * position, no camera make or serial — while being turned upright by the original's orientation tag.
 * EXIF is read back with exifr (an independent parser); tag numbers per CIPA DC-008 (GPS IFD, Make 0x010F).
 */
import exifr from 'exifr';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GET as photoGet } from '@/app/api/checks/[id]/photo/route';
import { intakePhoto } from '@/lib/checks/intake';
import { createBed } from '@/lib/services/beds';
import { getStorage } from '@/lib/storage';
import { SMALL_PATTERN } from '@/tests/checks/fixtures';
import { addMember, newOwner, useFreshDatabase, type WebTestDb, sessionCookie } from '@/tests/web/helpers';

let t: WebTestDb;
let checkId: string;
let original: Buffer;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  t = await useFreshDatabase({ storage: true });
  const owner = await newOwner(t.db, 'Photo shop');
  const reviewer = await addMember(t.db, owner.workshopId, 'reviewer');
  const other = await newOwner(t.db, 'Nosy shop');
  for (const [k, a] of [['reviewer', reviewer], ['other', other]] as const) cookies[k] = await sessionCookie(t.db, a);
  const bed = await createBed(t.db, owner, { name: 'Bed', pattern: SMALL_PATTERN });
  original = await sharp({ create: { width: 120, height: 80, channels: 3, background: { r: 150, g: 120, b: 90 } } })
    .jpeg()
    .withMetadata({ orientation: 6 })
    .withExifMerge({
      IFD0: { Make: 'TestCam', Model: 'Serial 12345' },
      IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '0/1 7/1 0/1' },
    })
    .toBuffer();
  const r = await intakePhoto(t.db, getStorage(), { workshopId: owner.workshopId, bedId: bed.id, userId: owner.user.id, source: original, referenceMm: 150 });
  checkId = r.check.id;
});
afterAll(async () => { await t.close(); });

const get = (cookie?: string) => photoGet(new Request(`http://gridproof.test/api/checks/${checkId}/photo`, { headers: { host: 'gridproof.test', ...(cookie ? { cookie } : {}) } }),
  { params: Promise.resolve({ id: checkId }) });

describe('uploaded photos', () => {
  it('has the position and camera in the original, to begin with', async () => {
    const tags = (await exifr.parse(original, { gps: true, tiff: true })) as Record<string, unknown>;
    expect(tags.Make).toBe('TestCam');
    expect(tags.GPSLatitudeRef).toBe('N');
    expect(tags.Orientation).toBeDefined();
  });

  it('serves members a display copy with no EXIF at all, turned upright', async () => {
    const res = await get(cookies.reviewer);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('image/jpeg');
    expect(res.headers.get('cache-control')).toMatch(/private/);
    const bytes = Buffer.from(await res.arrayBuffer());
    expect(await exifr.parse(bytes, { gps: true, tiff: true, exif: true })).toBeUndefined();
    const meta = await sharp(bytes).metadata();
    expect(meta.exif).toBeUndefined();
    expect([meta.width, meta.height]).toEqual([80, 120]); // orientation 6 applied
    expect(bytes.includes(Buffer.from('TestCam'))).toBe(false);
  });

  it('does not serve the photo to another workshop or without a session', async () => {
    expect((await get(cookies.other)).status).toBe(404);
    expect((await get()).status).toBe(401);
  });
});
