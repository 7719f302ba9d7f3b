/**
 * Read-side use cases for the report, review, history and comparison pages: each takes the actor first,
 * authorises and scopes every read by the actor's workshop (another workshop's check is "not found").
 *
 * - `getCheckDetail`: the check's bed, pattern (in mm, bed frame: origin front-left, +X right, +Y away from
 *   the operator), detections (image px, origin top-left, +y down) and the review record (who edited, when,
 *   what).
 * - `getDisplayPhoto`: a display copy of the uploaded photo — turned upright by its EXIF orientation (the
 *   frame the detections are in), bounded in size, re-encoded as JPEG with no metadata at all (no GPS, no
 *   camera serial), kept in storage so it is made once. A photo no copy can be made of (cut short, damaged,
 *   more than `PREVIEW_MAX_PIXELS`) answers 422 `photo_unreadable` with the reason, which is kept on the photo
 *   row so the detail says the photo is not available, and why.
 * - `exportCheck`: the positions or the panels as CSV, lengths in the chosen unit, or the report as JSON.
 */
import sharp from 'sharp';
import type { Db } from '@/db/client';
import { getBed } from '@/db/queries/beds';
import { getCheck } from '@/db/queries/checks';
import { getPhoto, setPhotoPreviewError, type PhotoRow } from '@/db/queries/photos';
import { getUserById } from '@/db/queries/users';
import { patternToMm, type PatternMm } from '@/lib/geometry';
import { parseStoredJson } from '@/lib/stored-json';
import { PatternSchema, PointsSchema, ReportSchema, type Points, type Report } from '@/lib/geometry/contract';
import { AppError, notFound } from '@/lib/http/errors';
import { exportFileName, panelsCsv, positionsCsv } from '@/lib/report/csv';
import type { LengthUnit } from '@/lib/report/units';
import { authorize, can, type Actor } from '@/lib/services/actor';
import { BlobNotFoundError, type Storage } from '@/lib/storage';
import { patterns } from '@/db/schema';
import { and, eq } from 'drizzle-orm';

export interface CheckDetail {
  check: {
    id: string;
    bedId: string;
    bedName: string;
    title: string | null;
    status: string;
    stage: string | null;
    error: string | null;
    referenceMm: number;
    createdAt: number;
    finishedAt: number | null;
    edited: { byId: string | null; byName: string | null; at: number; edits: unknown } | null;
  };
  /** The pattern the check was measured against, every length in mm. */
  pattern: PatternMm | null;
  patternRevision: number | null;
  /** The detections the current report was fitted to (image px), or null before the first analysis. */
  detections: Points | null;
  /** `available` false when there is no photo or no display copy can be made of it; `reason` says why. */
  photo: { available: boolean; reason: string | null; widthPx: number | null; heightPx: number | null };
  /** What the viewer may do here. */
  can: { review: boolean };
  /** The viewer's display units. */
  units: LengthUnit;
}

/** `GET /api/checks/{id}/detail`; the display copy is made here when missing, so `photo.available` is known. */
export async function getCheckDetail(db: Db, storage: Storage, actor: Actor, id: string): Promise<CheckDetail> {
  authorize(actor, 'workshop:read');
  const row = await getCheck(db, actor.workshopId, id);
  if (!row) throw notFound('check');
  const [bed, patternRow, photo, editor] = await Promise.all([
    getBed(db, actor.workshopId, row.bedId),
    db.select().from(patterns).where(and(eq(patterns.bedId, row.bedId), eq(patterns.id, row.patternId))).limit(1).then((r) => r[0]),
    row.photoId ? getPhoto(db, actor.workshopId, row.photoId) : Promise.resolve(undefined),
    row.editedBy ? getUserById(db, row.editedBy) : Promise.resolve(undefined),
  ]);
  const pattern = parseStoredJson(patternRow?.json, PatternSchema);
  const detections = parseStoredJson(row.detectionsJson, PointsSchema);
  let edits: unknown = null;
  try { edits = row.editsJson ? JSON.parse(row.editsJson) : null; } catch { edits = null; }
  const photoState = await previewState(db, storage, photo);
  return {
    check: {
      id: row.id,
      bedId: row.bedId,
      bedName: bed?.name ?? 'bed',
      title: row.title,
      status: row.status,
      stage: row.stage,
      error: row.error,
      referenceMm: row.referenceMm,
      createdAt: row.createdAt,
      finishedAt: row.finishedAt,
      edited: row.editedAt ? { byId: row.editedBy, byName: editor?.name ?? null, at: row.editedAt, edits } : null,
    },
    pattern: pattern ? patternToMm(pattern) : null,
    patternRevision: patternRow?.revision ?? null,
    detections,
    photo: { ...photoState, widthPx: photo?.widthPx ?? detections?.image.width ?? null, heightPx: photo?.heightPx ?? detections?.image.height ?? null },
    can: { review: can(actor, 'check:review') },
    units: actor.user.units,
  };
}

/** Longest side of the display copies, px. */
export const DISPLAY_SIZES = [1600, 3200] as const;
export type DisplaySize = (typeof DISPLAY_SIZES)[number];
/** Most pixels a display copy is made from (the decoder's bound against decompression bombs), px. */
export const PREVIEW_MAX_PIXELS = 100_000_000;

const displayKey = (photo: PhotoRow, size: DisplaySize) => `derived/${photo.workshopId}/${photo.sha256}-display-${size}.jpg`;
const unreadable = (reason: string) => new AppError('photo_unreadable', 422, reason);

/** Why sharp could not make a copy of `original`, in words for the person. */
async function previewFailure(original: Buffer, error: unknown): Promise<string> {
  const meta = await sharp(original, { limitInputPixels: false }).metadata().catch(() => null);
  const px = (meta?.width ?? 0) * (meta?.height ?? 0);
  if (meta?.width && meta.height && px > PREVIEW_MAX_PIXELS) {
    return `The photo has ${meta.width} × ${meta.height} px (${Math.round(px / 1e6)} MP), more than the ${PREVIEW_MAX_PIXELS / 1e6} MP a preview is made from. Upload a smaller copy of it.`;
  }
  const detail = (error instanceof Error ? error.message : String(error)).split('\n')[0]!.slice(0, 160);
  return `The photo cannot be decoded (it may be cut short or damaged: ${detail}). Upload the photo again from the camera or phone.`;
}

/** The display copy of `photo` at `size`: read from storage, or made from the original once and stored. */
async function displayCopy(db: Db, storage: Storage, photo: PhotoRow, size: DisplaySize): Promise<Buffer> {
  if (photo.previewError) throw unreadable(photo.previewError);
  const key = displayKey(photo, size);
  try {
    return await storage.getBytes(key);
  } catch (e) {
    if (!(e instanceof BlobNotFoundError)) throw e;
  }
  let original: Buffer;
  try {
    original = await storage.getBytes(photo.storageKey);
  } catch (e) {
    if (e instanceof BlobNotFoundError) throw new AppError('gone', 410, 'The original photo is no longer stored.');
    throw e;
  }
  let bytes: Buffer;
  try {
    // rotate() with no angle applies the EXIF orientation; sharp writes no metadata unless asked (withMetadata).
    bytes = await sharp(original, { limitInputPixels: PREVIEW_MAX_PIXELS })
      .rotate()
      .resize({ width: size, height: size, fit: 'inside', withoutEnlargement: true })
      .jpeg({ quality: 82, mozjpeg: true })
      .toBuffer();
  } catch (e) {
    const reason = await previewFailure(original, e);
    await setPhotoPreviewError(db, photo.id, reason);
    throw unreadable(reason);
  }
  await storage.put(bytes, { key, maxBytes: 50 * 1024 * 1024, contentType: 'image/jpeg' });
  return bytes;
}

/** Whether the check's photo can be shown: it exists and a display copy is (or can be) made of it. */
async function previewState(db: Db, storage: Storage, photo: PhotoRow | undefined): Promise<{ available: boolean; reason: string | null }> {
  if (!photo) return { available: false, reason: 'The photo of this check was deleted.' };
  if (photo.previewError) return { available: false, reason: photo.previewError };
  if (await storage.exists(displayKey(photo, DISPLAY_SIZES[0]))) return { available: true, reason: null };
  try {
    await displayCopy(db, storage, photo, DISPLAY_SIZES[0]);
    return { available: true, reason: null };
  } catch (e) {
    if (e instanceof AppError) return { available: false, reason: e.message };
    throw e;
  }
}

/**
 * `GET /api/checks/{id}/photo?size=` — the display copy (JPEG, upright, no metadata), made from the stored
 * original once and kept under `derived/…`; 422 `photo_unreadable` with the reason when none can be made.
 */
export async function getDisplayPhoto(db: Db, storage: Storage, actor: Actor, id: string, size: DisplaySize): Promise<{ bytes: Buffer; etag: string }> {
  authorize(actor, 'workshop:read');
  const row = await getCheck(db, actor.workshopId, id);
  if (!row?.photoId) throw notFound('photo');
  const photo = await getPhoto(db, actor.workshopId, row.photoId);
  if (!photo) throw notFound('photo');
  return { bytes: await displayCopy(db, storage, photo, size), etag: `"${photo.sha256.slice(0, 32)}-${size}"` };
}

/** What a check exports as: its positions as CSV, its panels as CSV, or the report JSON. */
export const EXPORT_FORMATS = ['csv', 'panels-csv', 'json'] as const;
export type ExportFormat = (typeof EXPORT_FORMATS)[number];

/** `GET /api/checks/{id}/export?format=csv|panels-csv|json&units=mm|in` */
export async function exportCheck(db: Db, actor: Actor, id: string, format: ExportFormat, unit: LengthUnit): Promise<{ body: string; contentType: string; fileName: string }> {
  authorize(actor, 'workshop:read');
  const row = await getCheck(db, actor.workshopId, id);
  if (!row) throw notFound('check');
  if (!row.reportJson) throw new AppError('not_ready', 409, `The check is ${row.status}; the report can be exported once it is done.`);
  const report: Report = ReportSchema.parse(JSON.parse(row.reportJson));
  const bed = await getBed(db, actor.workshopId, row.bedId);
  const stem = `${bed?.name ?? 'bed'}-${row.title ?? row.id.slice(0, 8)}`;
  const date = new Date(row.finishedAt ?? row.createdAt);
  const csv = 'text/csv; charset=utf-8; header=present';
  if (format === 'csv') return { body: positionsCsv(report, unit), contentType: csv, fileName: exportFileName(stem, date, 'csv') };
  if (format === 'panels-csv') return { body: panelsCsv(report, unit), contentType: csv, fileName: exportFileName(`${stem}-panels`, date, 'csv') };
  return { body: JSON.stringify(report, null, 2), contentType: 'application/json; charset=utf-8', fileName: exportFileName(stem, date, 'json') };
}
