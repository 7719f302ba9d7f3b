/**
 * Read-side use cases for the report, review, history and comparison pages: each takes the actor first,
 * authorises and scopes every read by the actor's workshop (another workshop's check is "not found").
 *
 * - `getCheckDetail`: the check's bed, pattern (in mm, bed frame: origin front-left, +X right, +Y away from
 *   the operator), detections (image px, origin top-left, +y down) and the review record (who edited, when,
 *   what).
 * - `getDisplayPhoto`: a display copy of the uploaded photo — turned upright by its EXIF orientation (the
 *   frame the detections are in), bounded in size, re-encoded as JPEG with no metadata at all (no GPS, no
 *   camera serial), kept in storage so it is made once.
 * - `exportCheck`: the report as CSV or JSON, lengths in the chosen unit.
 */
import sharp from 'sharp';
import type { Db } from '@/db/client';
import { getBed } from '@/db/queries/beds';
import { getCheck } from '@/db/queries/checks';
import { getPhoto } from '@/db/queries/photos';
import { getUserById } from '@/db/queries/users';
import { patternToMm, type PatternMm } from '@/lib/geometry';
import { PatternSchema, PointsSchema, ReportSchema, type Points, type Report } from '@/lib/geometry/contract';
import { AppError, notFound } from '@/lib/http/errors';
import { exportFileName, positionsCsv } from '@/lib/report/csv';
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
  photo: { available: boolean; widthPx: number | null; heightPx: number | null };
  /** What the viewer may do here. */
  can: { review: boolean };
  /** The viewer's display units. */
  units: LengthUnit;
}

function parseJson<T>(text: string | null, schema: { safeParse(v: unknown): { success: true; data: T } | { success: false } }): T | null {
  if (!text) return null;
  try {
    const r = schema.safeParse(JSON.parse(text));
    return r.success ? r.data : null;
  } catch {
    return null;
  }
}

/** `GET /api/checks/{id}/detail` */
export async function getCheckDetail(db: Db, actor: Actor, id: string): Promise<CheckDetail> {
  authorize(actor, 'workshop:read');
  const row = await getCheck(db, actor.workshopId, id);
  if (!row) throw notFound('check');
  const [bed, patternRow, photo, editor] = await Promise.all([
    getBed(db, actor.workshopId, row.bedId),
    db.select().from(patterns).where(and(eq(patterns.bedId, row.bedId), eq(patterns.id, row.patternId))).limit(1).then((r) => r[0]),
    row.photoId ? getPhoto(db, actor.workshopId, row.photoId) : Promise.resolve(undefined),
    row.editedBy ? getUserById(db, row.editedBy) : Promise.resolve(undefined),
  ]);
  const pattern = parseJson(patternRow?.json ?? null, PatternSchema);
  const detections = parseJson(row.detectionsJson, PointsSchema);
  let edits: unknown = null;
  try { edits = row.editsJson ? JSON.parse(row.editsJson) : null; } catch { edits = null; }
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
    photo: { available: !!photo, widthPx: photo?.widthPx ?? detections?.image.width ?? null, heightPx: photo?.heightPx ?? detections?.image.height ?? null },
    can: { review: can(actor, 'check:review') },
    units: actor.user.units,
  };
}

/** Longest side of the display copies, px. */
export const DISPLAY_SIZES = [1600, 3200] as const;
export type DisplaySize = (typeof DISPLAY_SIZES)[number];

/**
 * `GET /api/checks/{id}/photo?size=` — the display copy (JPEG, upright, no metadata), made from the stored
 * original once and kept under `derived/…`.
 */
export async function getDisplayPhoto(db: Db, storage: Storage, actor: Actor, id: string, size: DisplaySize): Promise<{ bytes: Buffer; etag: string }> {
  authorize(actor, 'workshop:read');
  const row = await getCheck(db, actor.workshopId, id);
  if (!row?.photoId) throw notFound('photo');
  const photo = await getPhoto(db, actor.workshopId, row.photoId);
  if (!photo) throw notFound('photo');
  const key = `derived/${photo.workshopId}/${photo.sha256}-display-${size}.jpg`;
  const etag = `"${photo.sha256.slice(0, 32)}-${size}"`;
  try {
    return { bytes: await storage.getBytes(key), etag };
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
  // rotate() with no angle applies the EXIF orientation; sharp writes no metadata unless asked (withMetadata).
  const bytes = await sharp(original, { limitInputPixels: 100_000_000 })
    .rotate()
    .resize({ width: size, height: size, fit: 'inside', withoutEnlargement: true })
    .jpeg({ quality: 82, mozjpeg: true })
    .toBuffer();
  await storage.put(bytes, { key, maxBytes: 50 * 1024 * 1024, contentType: 'image/jpeg' });
  return { bytes, etag };
}

/** `GET /api/checks/{id}/export?format=csv|json&units=mm|in` */
export async function exportCheck(db: Db, actor: Actor, id: string, format: 'csv' | 'json', unit: LengthUnit): Promise<{ body: string; contentType: string; fileName: string }> {
  authorize(actor, 'workshop:read');
  const row = await getCheck(db, actor.workshopId, id);
  if (!row) throw notFound('check');
  if (!row.reportJson) throw new AppError('not_ready', 409, `The check is ${row.status}; the report can be exported once it is done.`);
  const report: Report = ReportSchema.parse(JSON.parse(row.reportJson));
  const bed = await getBed(db, actor.workshopId, row.bedId);
  const stem = `${bed?.name ?? 'bed'}-${row.title ?? row.id.slice(0, 8)}`;
  const date = new Date(row.finishedAt ?? row.createdAt);
  if (format === 'csv') return { body: positionsCsv(report, unit), contentType: 'text/csv; charset=utf-8; header=present', fileName: exportFileName(stem, date, 'csv') };
  return { body: JSON.stringify(report, null, 2), contentType: 'application/json; charset=utf-8', fileName: exportFileName(stem, date, 'json') };
}
