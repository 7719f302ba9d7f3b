/**
 * Uploaded originals. One row per distinct content (SHA-256) within a workshop: uploading the same photo
 * twice finds the first row (unique index photos_workshop_sha_unique).
 */
import { and, eq } from 'drizzle-orm';
import { photos } from '@/db/schema';
import { newId, type Queryable } from './types';

export type PhotoRow = typeof photos.$inferSelect;

export interface PhotoInput {
  workshopId: string;
  bedId: string | null;
  sha256: string;
  storageKey: string;
  contentType: string;
  byteSize: number;
  originalName?: string | null;
  uploadedBy: string | null;
}

/** The storage key of a workshop's photo with this content (workshop-scoped, so a workshop's deletion is its own). */
export function photoStorageKey(workshopId: string, sha256: string): string {
  return `photos/${workshopId}/${sha256}`;
}

/**
 * Inserts the photo unless the workshop already has one with this content; returns the row that is now
 * there and whether it was created by this call.
 */
export async function insertOrFindPhoto(db: Queryable, input: PhotoInput): Promise<{ photo: PhotoRow; created: boolean }> {
  const inserted = await db.insert(photos).values({
    id: newId(),
    workshopId: input.workshopId,
    bedId: input.bedId,
    sha256: input.sha256,
    storageKey: input.storageKey,
    contentType: input.contentType,
    byteSize: input.byteSize,
    originalName: input.originalName ?? null,
    uploadedBy: input.uploadedBy,
  }).onConflictDoNothing({ target: [photos.workshopId, photos.sha256] }).returning();
  if (inserted[0]) return { photo: inserted[0], created: true };
  const found = await findPhotoBySha(db, input.workshopId, input.sha256);
  if (!found) throw new Error('insertOrFindPhoto: conflicting photo row vanished');
  return { photo: found, created: false };
}

export async function findPhotoBySha(db: Queryable, workshopId: string, sha256: string): Promise<PhotoRow | undefined> {
  const [row] = await db.select().from(photos).where(and(eq(photos.workshopId, workshopId), eq(photos.sha256, sha256))).limit(1);
  return row;
}

/** A photo of the workshop (another workshop's photo is "not found"). */
export async function getPhoto(db: Queryable, workshopId: string, id: string): Promise<PhotoRow | undefined> {
  const [row] = await db.select().from(photos).where(and(eq(photos.workshopId, workshopId), eq(photos.id, id))).limit(1);
  return row;
}

/** A photo by id alone, for the worker (which acts for the system, not for a user). */
export async function getPhotoById(db: Queryable, id: string): Promise<PhotoRow | undefined> {
  const [row] = await db.select().from(photos).where(eq(photos.id, id)).limit(1);
  return row;
}

/** Whether any photo row points at this storage key (before deleting a blob). */
export async function isStorageKeyReferenced(db: Queryable, storageKey: string): Promise<boolean> {
  const [row] = await db.select({ id: photos.id }).from(photos).where(eq(photos.storageKey, storageKey)).limit(1);
  return Boolean(row);
}

/** Records the pixel size once the worker has decoded the photo. */
export async function setPhotoSize(db: Queryable, id: string, widthPx: number, heightPx: number): Promise<void> {
  await db.update(photos).set({ widthPx, heightPx }).where(eq(photos.id, id));
}

/** Records why no display copy can be made of the photo (shown by the check's detail instead of a preview). */
export async function setPhotoPreviewError(db: Queryable, id: string, reason: string): Promise<void> {
  await db.update(photos).set({ previewError: reason.slice(0, 500) }).where(eq(photos.id, id));
}
