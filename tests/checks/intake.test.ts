/**
 * Photo intake on a real migrated SQLite file and a real local store. Test photos are encoded by sharp (an
 * independent image library); signatures follow the JPEG (ITU-T T.81) and PNG (ISO/IEC 15948) standards.
 */
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import sharp from 'sharp';
import { afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { checks, jobs, photos } from '@/db/schema';
import { intakePhoto, IntakeError } from '@/lib/checks/intake';
import { sniffImageType } from '@/lib/checks/sniff';
import { LocalStorage } from '@/lib/storage';
import { tempDb, type TempDb } from '../queue/helpers';
import { makeShop, type Shop } from './fixtures';

let jpeg: Buffer;
let png: Buffer;
beforeAll(async () => {
  const raw = { raw: { width: 64, height: 48, channels: 3 as const } };
  const pixels = Buffer.alloc(64 * 48 * 3, 180);
  jpeg = await sharp(pixels, raw).jpeg().toBuffer();
  png = await sharp(pixels, raw).png().toBuffer();
});

let t: TempDb;
let root: string;
let storage: LocalStorage;
let shop: Shop;
beforeEach(async () => {
  t = await tempDb();
  root = mkdtempSync(join(tmpdir(), 'gridproof-intake-'));
  storage = new LocalStorage(root);
  shop = await makeShop(t.db);
});
afterEach(() => { t.close(); rmSync(root, { recursive: true, force: true }); });

const base = () => ({ workshopId: shop.workshopId, bedId: shop.bedId, userId: shop.userId, referenceMm: 150 });
const storedFiles = () => readdirSync(join(root, 'photos', shop.workshopId), { withFileTypes: true }).filter((d) => d.isFile()).length;
const count = async (table: typeof photos | typeof checks | typeof jobs) => (await t.db.select().from(table)).length;

describe('intake', () => {
  it('stores the photo, and queues a check on the bed\'s current pattern with its job', async () => {
    const r = await intakePhoto(t.db, storage, { ...base(), source: Readable.from([jpeg.subarray(0, 10), jpeg.subarray(10)]), name: 'bed.jpg' });
    expect(r.photoCreated).toBe(true);
    expect(r.photo.contentType).toBe('image/jpeg');
    expect(r.photo.byteSize).toBe(jpeg.length);
    expect((await storage.getBytes(r.photo.storageKey)).equals(jpeg)).toBe(true);
    expect(r.check).toMatchObject({ status: 'queued', patternId: shop.patternId, referenceMm: 150, photoId: r.photo.id, bedId: shop.bedId });
    expect(r.job).toMatchObject({ kind: 'check.analyze', status: 'queued', checkId: r.check.id });
  });

  it('makes one photo and one check of the same photo uploaded twice', async () => {
    const a = await intakePhoto(t.db, storage, { ...base(), source: jpeg });
    const b = await intakePhoto(t.db, storage, { ...base(), source: Readable.from([jpeg]) });
    expect(b.photo.id).toBe(a.photo.id);
    expect(b.photoCreated).toBe(false);
    expect(b.reusedCheck).toBe(true);
    expect(b.check.id).toBe(a.check.id);
    expect(b.job).toBeNull();
    expect(await count(photos)).toBe(1);
    expect(await count(checks)).toBe(1);
    expect(await count(jobs)).toBe(1);
    expect(storedFiles()).toBe(1);
  });

  it('measures the same photo again when the reference size differs, still as one photo', async () => {
    const a = await intakePhoto(t.db, storage, { ...base(), source: jpeg });
    const b = await intakePhoto(t.db, storage, { ...base(), referenceMm: 100, source: jpeg, corners: [[1, 1], [40, 1], [40, 40], [1, 40]] });
    expect(b.photo.id).toBe(a.photo.id);
    expect(b.check.id).not.toBe(a.check.id);
    expect(JSON.parse(b.check.cornersJson!)).toEqual([[1, 1], [40, 1], [40, 40], [1, 40]]);
    expect(await count(photos)).toBe(1);
    expect(await count(checks)).toBe(2);
  });

  it('keeps a PNG named .jpg as a PNG, by its bytes', async () => {
    const r = await intakePhoto(t.db, storage, { ...base(), source: png, name: 'photo.jpg', contentType: 'image/jpeg' });
    expect(r.photo.contentType).toBe('image/png');
  });

  it.each([
    ['text named .jpg', Buffer.from('this is not a photo at all, just words'), 'not-an-image', 415],
    ['zero bytes', Buffer.alloc(0), 'empty', 400],
    ['a few bytes', Buffer.from([0x47, 0x49]), 'not-an-image', 415],
  ])('refuses %s and keeps nothing', async (_what, bytes, code, status) => {
    const err = await intakePhoto(t.db, storage, { ...base(), source: bytes, name: 'x.jpg' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(IntakeError);
    expect((err as IntakeError).code).toBe(code);
    expect((err as IntakeError).status).toBe(status);
    expect(await count(photos)).toBe(0);
    expect(await count(checks)).toBe(0);
    expect(readdirSync(join(root, '.tmp'))).toEqual([]);
  });

  it('refuses a photo over the limit with the limit in the message and keeps nothing', async () => {
    const err = await intakePhoto(t.db, storage, { ...base(), source: jpeg, maxBytes: 100 }).catch((e: unknown) => e);
    expect((err as IntakeError).code).toBe('too-large');
    expect((err as Error).message).toMatch(/limit of 100 bytes/);
    expect(await count(photos)).toBe(0);
    expect(readdirSync(join(root, '.tmp'))).toEqual([]);
  });

  it('refuses a bad reference size with the field named', async () => {
    for (const referenceMm of [0, -5, Number.NaN, 5000]) {
      const err = await intakePhoto(t.db, storage, { ...base(), referenceMm, source: jpeg }).catch((e: unknown) => e);
      expect((err as IntakeError).code).toBe('bad-input');
      expect(Object.keys((err as IntakeError).fields ?? {})).toContain('referenceMm');
    }
  });

  it("treats another workshop's bed as not found and a bed without pattern as not ready", async () => {
    const other = await makeShop(t.db, 'other');
    const err = await intakePhoto(t.db, storage, { ...base(), bedId: other.bedId, source: jpeg }).catch((e: unknown) => e);
    expect((err as IntakeError).status).toBe(404);
    const bare = await makeShop(t.db, 'bare', null);
    const err2 = await intakePhoto(t.db, storage, { ...base(), workshopId: bare.workshopId, bedId: bare.bedId, source: jpeg }).catch((e: unknown) => e);
    expect((err2 as IntakeError).code).toBe('no-pattern');
    expect(await count(photos)).toBe(0);
  });

  it('removes the stored blob again when the database refuses the rows', async () => {
    // a user id that does not exist breaks the foreign key of photos.uploaded_by inside the transaction
    const err = await intakePhoto(t.db, storage, { ...base(), userId: 'no-such-user', source: jpeg }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(Error);
    expect(await count(photos)).toBe(0);
    expect(readdirSync(join(root, 'photos', shop.workshopId))).toEqual([]);
  });
});

describe('image signatures', () => {
  it('recognises the encoders\' output and nothing else', async () => {
    expect(sniffImageType(jpeg)).toBe('image/jpeg');
    expect(sniffImageType(png)).toBe('image/png');
    expect(sniffImageType(await sharp(png).webp().toBuffer())).toBe('image/webp');
    expect(sniffImageType(await sharp(png).tiff().toBuffer())).toBe('image/tiff');
    expect(sniffImageType(Buffer.from('GIF89a'))).toBeNull();
    expect(sniffImageType(Buffer.from('%PDF-1.7 ...'))).toBeNull();
  });
});
