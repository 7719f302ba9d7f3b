/**
 * Photo intake: an uploaded photo becomes a stored original and a queued check.
 *
 * 1. The inputs are checked (reference square size in mm, optional corners in image px).
 * 2. The bytes stream to storage while being hashed (SHA-256) and counted against the upload limit; the first
 *    bytes must be an image signature. Nothing partial is ever stored.
 * 3. In ONE transaction: the photo row is found or created (unique per workshop and SHA-256: the same photo
 *    twice is one photo), and a check (status queued, pattern = the bed's current pattern) is created with its
 *    analysis job. Uploading the same photo again with the same inputs returns the existing check.
 * If the transaction fails, a blob that no photo row references is removed again.
 *
 * The caller (route handler / service) has already authorised the user for `photo:upload` in `workshopId`.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { getPattern } from '@/db/queries/patterns';
import { MeasuredDistancesSchema, PatternSchema, type MeasuredDistance } from '@/lib/geometry/contract';
import { parseStoredJson } from '@/lib/stored-json';
import { buildLattice } from '@/lib/geometry/lattice';
import { patternToMm } from '@/lib/geometry/units';
import { getBed } from '@/db/queries/beds';
import { findSameCheck, insertCheckWithJob, type CheckRow } from '@/db/queries/checks';
import { withBusyRetry, type Job } from '@/db/queries/jobs';
import { insertOrFindPhoto, isStorageKeyReferenced, photoStorageKey, type PhotoRow } from '@/db/queries/photos';
import { BlobTooLargeError, type BlobSource, type Storage, uploadMaxBytes } from '@/lib/storage';
import { SNIFF_BYTES, sniffImageType, type ImageType } from './sniff';

/** Why an upload was refused; `status` is the HTTP status a handler should answer with. */
export class IntakeError extends Error {
  constructor(
    readonly code: 'bad-input' | 'bed-not-found' | 'no-pattern' | 'empty' | 'not-an-image' | 'too-large',
    readonly status: number,
    message: string,
    readonly fields?: Record<string, string>,
  ) {
    super(message);
    this.name = 'IntakeError';
  }
}

const PointPx = z.tuple([z.number().finite(), z.number().finite()]);
/** The reference square's four corners in image px, in order around the square. */
export const CornersSchema = z.tuple([PointPx, PointPx, PointPx, PointPx]);
export type Corners = z.infer<typeof CornersSchema>;

export const IntakeFieldsSchema = z.object({
  /** Measured side of the reference square, mm (the contract allows up to 2000 mm). */
  referenceMm: z.number().finite().positive().max(2000),
  corners: CornersSchema.nullable().optional(),
  title: z.string().trim().max(120).nullable().optional(),
  /** Measured distances between two positions (labels as the report writes them), for the fit. */
  distances: MeasuredDistancesSchema.nullable().optional(),
});

export interface IntakeInput {
  workshopId: string;
  bedId: string;
  userId: string | null;
  source: BlobSource;
  /** The client's declared type; informative only (the stored type comes from the bytes). */
  contentType?: string | null;
  name?: string | null;
  referenceMm: number;
  corners?: Corners | null;
  title?: string | null;
  distances?: MeasuredDistance[] | null;
  /** Upload limit in bytes; `UPLOAD_MAX_BYTES` or 40 MB by default. */
  maxBytes?: number;
}

export interface IntakeResult {
  check: CheckRow;
  /** The queued job, or null when an existing check was returned. */
  job: Job | null;
  photo: PhotoRow;
  /** False when the workshop already had this photo. */
  photoCreated: boolean;
  /** True when the same photo with the same inputs was already checked (or queued): that check is returned. */
  reusedCheck: boolean;
}

/** Passes `source` through, refusing an empty body or one that does not start with an image signature. */
async function* requireImage(source: BlobSource, found: (t: ImageType) => void): AsyncGenerator<Uint8Array> {
  const iterable: AsyncIterable<Uint8Array> = source instanceof Uint8Array ? (async function* () { yield source; })() : source;
  let head = Buffer.alloc(0);
  let checked = false;
  for await (const raw of iterable) {
    const chunk = typeof raw === 'string' ? Buffer.from(raw) : Buffer.from(raw.buffer, raw.byteOffset, raw.byteLength);
    if (!checked) {
      head = Buffer.concat([head, chunk]);
      if (head.length < SNIFF_BYTES) continue;
      const type = sniffImageType(head);
      if (!type) throw notAnImage();
      found(type);
      checked = true;
      yield head;
      continue;
    }
    yield chunk;
  }
  if (!checked) {
    if (head.length === 0) throw new IntakeError('empty', 400, 'The file is empty. Choose a photo of the bed and upload it again.');
    const type = sniffImageType(head);
    if (!type) throw notAnImage();
    found(type);
    yield head;
  }
}

function notAnImage() {
  return new IntakeError('not-an-image', 415, 'This file is not a photo Gridproof can read. Upload a JPEG, PNG, WebP, TIFF or HEIC photo of the bed.');
}

/** A photo streamed to storage, not yet recorded in the database. */
export interface StoredUpload {
  workshopId: string;
  key: string;
  sha256: string;
  size: number;
  contentType: ImageType;
}

function validateFields(input: Pick<IntakeInput, 'referenceMm' | 'corners' | 'title' | 'distances'>) {
  const fields = IntakeFieldsSchema.safeParse({ referenceMm: input.referenceMm, corners: input.corners ?? null, title: input.title ?? null, distances: input.distances?.length ? input.distances : null });
  if (!fields.success) {
    const f: Record<string, string> = {};
    for (const issue of fields.error.issues) f[String(issue.path[0] ?? 'form')] ??= issue.message;
    throw new IntakeError('bad-input', 400, 'Some fields of the upload have problems.', f);
  }
  return fields.data;
}

/** The bed's current pattern id; IntakeError when the bed is not the workshop's or has no pattern. */
export async function bedPatternForUpload(db: Db, workshopId: string, bedId: string): Promise<string> {
  const bed = await getBed(db, workshopId, bedId);
  if (!bed) throw new IntakeError('bed-not-found', 404, 'No such bed in this workshop.');
  if (!bed.currentPatternId) {
    throw new IntakeError('no-pattern', 409, 'This bed has no pattern yet. Describe its holes and panels first, then upload a photo.');
  }
  return bed.currentPatternId;
}

/** Refuses distances whose labels the bed's pattern does not have (before the photo is measured, not after). */
async function checkDistanceLabels(db: Db, bedId: string, patternId: string, distances: readonly MeasuredDistance[]): Promise<void> {
  const pattern = parseStoredJson((await getPattern(db, bedId, patternId))?.json, PatternSchema);
  if (!pattern) return; // the analysis reports a broken pattern itself
  const labels = new Set(buildLattice(patternToMm(pattern)).positions.map((q) => q.label.toLowerCase()));
  const norm = (l: string) => l.trim().replace(/\s+/g, ' ').toLowerCase();
  for (const d of distances) {
    for (const label of [d.from, d.to]) {
      if (!labels.has(norm(label))) {
        throw new IntakeError('bad-input', 400, 'Some fields of the upload have problems.', { distances: `This bed has no position "${label}". Write labels as the report does, e.g. "${[...labels][0] ?? 'insert A1'}".` });
      }
    }
  }
}

/**
 * Step 1: streams the photo to storage under `photos/<workshop>/<sha256>`, hashing and limiting it; refuses
 * what is empty, not an image or too large (nothing stays stored then).
 */
export async function storeUpload(storage: Storage, workshopId: string, source: BlobSource, maxBytes = uploadMaxBytes()): Promise<StoredUpload> {
  let type: ImageType | undefined;
  try {
    const put = await storage.put(requireImage(source, (t) => { type = t; }), {
      key: ({ sha256 }) => photoStorageKey(workshopId, sha256),
      maxBytes,
    });
    return { workshopId, key: put.key, sha256: put.sha256, size: put.size, contentType: type ?? 'image/jpeg' };
  } catch (e) {
    if (e instanceof BlobTooLargeError) {
      throw new IntakeError('too-large', 413, `${e.message} Take the photo at a lower resolution or export a smaller copy.`);
    }
    throw e;
  }
}

/** Removes a stored upload again unless a photo row points at it (another upload of the same photo). */
export async function discardUpload(db: Db, storage: Storage, stored: StoredUpload): Promise<void> {
  if (!(await isStorageKeyReferenced(db, stored.key).catch(() => true))) await storage.delete(stored.key).catch(() => undefined);
}

/**
 * Step 2: in ONE transaction, finds or creates the photo row and creates the check with its job (or returns
 * the same check for the same inputs). On failure the stored blob is discarded unless referenced.
 */
export async function queueCheck(
  db: Db, storage: Storage, stored: StoredUpload,
  input: Omit<IntakeInput, 'source' | 'contentType' | 'maxBytes' | 'workshopId'>,
): Promise<IntakeResult> {
  try {
    const fields = validateFields(input);
    const patternId = await bedPatternForUpload(db, stored.workshopId, input.bedId);
    const corners = fields.corners ?? null;
    const distances = fields.distances ?? null;
    if (distances) await checkDistanceLabels(db, input.bedId, patternId, distances);
    return await withBusyRetry('save the upload', () => db.transaction(async (tx) => {
      const { photo, created } = await insertOrFindPhoto(tx, {
        workshopId: stored.workshopId,
        bedId: input.bedId,
        sha256: stored.sha256,
        storageKey: stored.key,
        contentType: stored.contentType,
        byteSize: stored.size,
        originalName: input.name?.slice(0, 255) ?? null,
        uploadedBy: input.userId,
      });
      const same = created ? undefined : await findSameCheck(tx, {
        workshopId: stored.workshopId, bedId: input.bedId, photoId: photo.id, patternId, referenceMm: fields.referenceMm, corners, distances,
      });
      if (same) return { check: same, job: null, photo, photoCreated: false, reusedCheck: true };
      const { check, job } = await insertCheckWithJob(tx, {
        workshopId: stored.workshopId,
        bedId: input.bedId,
        photoId: photo.id,
        patternId,
        referenceMm: fields.referenceMm,
        corners,
        distances,
        title: fields.title ?? null,
        createdBy: input.userId,
      });
      return { check, job, photo, photoCreated: created, reusedCheck: false };
    }), { db });
  } catch (e) {
    // nothing in the database points at the blob: remove it so that no orphan stays in storage
    await discardUpload(db, storage, stored);
    throw e;
  }
}

/** Stores the photo and queues its check; see the module header. Throws `IntakeError` for a refused upload. */
export async function intakePhoto(db: Db, storage: Storage, input: IntakeInput): Promise<IntakeResult> {
  validateFields(input);
  await bedPatternForUpload(db, input.workshopId, input.bedId);
  const stored = await storeUpload(storage, input.workshopId, input.source, input.maxBytes ?? uploadMaxBytes());
  return queueCheck(db, storage, stored, input);
}
