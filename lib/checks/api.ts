/**
 * Check use cases for the route handlers: each takes the actor first, authorises, and scopes every read by
 * the actor's workshop (another workshop's bed or check is "not found", never "forbidden").
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { getBed, listBedChecks, type CheckListRow } from '@/db/queries/beds';
import { checkStatusView, getCheck, getCheckReportRef, getCheckReportText, requestRefit, CheckStateError, type CheckStatusView } from '@/db/queries/checks';
import { compareReports, type Comparison } from '@/lib/geometry';
import { MeasuredDistancesSchema, PointsSchema, type Report } from '@/lib/geometry/contract';
import { decimalIn } from '@/lib/http/decimal';
import { AppError, conflict, invalidInput, notFound } from '@/lib/http/errors';
import { authorize, type Actor } from '@/lib/services/actor';
import { formatBytes, type Storage, uploadMaxBytes } from '@/lib/storage';
import { bedPatternForUpload, CornersSchema, discardUpload, IntakeError, queueCheck, storeUpload, type StoredUpload } from './intake';
import { boundaryOf, MultipartError, readParts, readText } from './multipart';
import { reportAt, reportBodyAt } from './report-cache';

/** Slack for the multipart envelope (boundaries, part headers, the small fields) above the photo limit. */
const ENVELOPE_BYTES = 64 * 1024;

function toAppError(e: IntakeError): AppError {
  switch (e.code) {
    case 'bad-input': return invalidInput(e.message, e.fields);
    case 'bed-not-found': return notFound('bed');
    case 'no-pattern': return conflict(e.message);
    case 'empty': return new AppError('empty_file', 400, e.message, { photo: e.message });
    case 'not-an-image': return new AppError('unsupported_media_type', 415, e.message, { photo: e.message });
    case 'too-large': return new AppError('too_large', 413, e.message, { photo: e.message });
  }
}

const UploadFieldsSchema = z.object({
  // a reference square is 20 mm to 2 m on a side: our printed target is 250 mm, a sheet square up to 1220 mm
  // (common practice); below 20 mm the square is smaller than one pitch of any bed and measures nothing
  referenceMm: decimalIn('referenceMm', 20, 2000, 'mm (the measured side of the reference square)'),
  corners: z.string().max(2000).optional().transform((s, ctx) => {
    if (s === undefined || s.trim() === '') return null;
    try {
      const parsed = CornersSchema.safeParse(JSON.parse(s));
      if (parsed.success) return parsed.data;
    } catch { /* reported below */ }
    ctx.addIssue({ code: 'custom', message: 'Corners must be four [x, y] pixel pairs, e.g. [[10,10],[200,10],[200,200],[10,200]].' });
    return z.NEVER;
  }),
  title: z.string().trim().max(120, 'title must be at most 120 characters').optional(),
  distances: z.string().max(8192).optional().transform((s, ctx) => {
    if (s === undefined || s.trim() === '') return null;
    try {
      const parsed = MeasuredDistancesSchema.safeParse(JSON.parse(s));
      if (parsed.success) return parsed.data.length ? parsed.data : null;
      const i = parsed.error.issues[0];
      ctx.addIssue({ code: 'custom', message: `Distance ${typeof i?.path[0] === 'number' ? `${i.path[0] + 1}: ` : ''}${i?.path.slice(1).join('.') || 'list'} ${i?.message ?? 'is not valid'}.` });
      return z.NEVER;
    } catch { /* reported below */ }
    ctx.addIssue({ code: 'custom', message: 'Distances must be a JSON list like [{"from": "insert A1", "to": "insert R12", "mm": 1700.4, "sigmaMm": 0.3}].' });
    return z.NEVER;
  }),
});

export interface UploadAnswer {
  check: { id: string; status: string };
  photo: { id: string; duplicate: boolean };
  /** True when the same photo with the same inputs was already checked: its check is returned. */
  reused: boolean;
}

/**
 * `POST /api/beds/{bedId}/checks`: multipart `photo`, `referenceMm`, optional `corners` (JSON), `title` and
 * `distances` (JSON `[{ from, to, mm, sigmaMm }]`, labels as the report writes them), in any
 * order. The photo streams to storage as it arrives (hashed and limited on the way); the fields are checked
 * once the form is read, and a refused upload leaves no stored file behind.
 */
export async function uploadCheck(db: Db, storage: Storage, actor: Actor, bedId: string, req: Request): Promise<UploadAnswer> {
  authorize(actor, 'photo:upload');
  authorize(actor, 'check:run');
  const maxBytes = uploadMaxBytes();
  const boundary = boundaryOf(req.headers.get('content-type'));
  if (!boundary) throw new AppError('unsupported_media_type', 415, 'Send the photo as multipart/form-data with fields photo and referenceMm.');
  const tooLarge = () => new AppError('too_large', 413, `The upload is larger than the limit of ${formatBytes(maxBytes)}. Take the photo at a lower resolution or export a smaller copy.`, { photo: 'Too large.' });
  const declared = Number(req.headers.get('content-length'));
  if (Number.isFinite(declared) && declared > maxBytes + ENVELOPE_BYTES) throw tooLarge();
  try {
    await bedPatternForUpload(db, actor.workshopId, bedId);
  } catch (e) {
    if (e instanceof IntakeError) throw toAppError(e);
    throw e;
  }
  if (!req.body) throw invalidInput('The upload is empty.', { photo: 'Choose a photo.' });

  const text: Record<string, string> = {};
  let stored: StoredUpload | undefined;
  let name: string | null = null;
  try {
    let parts = 0;
    for await (const part of readParts(req.body as unknown as AsyncIterable<Uint8Array>, boundary)) {
      if (++parts > 20) throw invalidInput('The form has too many parts.');
      if (part.name === 'photo' && part.filename !== undefined && !stored) {
        name = part.filename || null;
        stored = await storeUpload(storage, actor.workshopId, part.body, maxBytes);
      } else if (part.filename === undefined && ['referenceMm', 'corners', 'title', 'distances'].includes(part.name)) {
        const limit = part.name === 'distances' ? 8192 : 4096;
        try {
          text[part.name] = await readText(part, limit);
        } catch (e) {
          // a too-long field is that field's problem, not the photo's
          if (!(e instanceof MultipartError)) throw e;
          throw invalidInput('Some fields of the upload need attention.', { [part.name]: `${part.name} must be at most ${part.name === 'title' ? '120 characters' : `${limit} bytes`}` });
        }
      }
      // other parts are skipped unread
    }
    if (!stored) throw invalidInput('Choose a photo of the bed.', { photo: 'Required.' });
    const fields = UploadFieldsSchema.safeParse(text);
    if (!fields.success) {
      const f: Record<string, string> = {};
      for (const i of fields.error.issues) f[String(i.path[0] ?? '_')] ??= i.message;
      throw invalidInput('Some fields of the upload need attention.', f);
    }
    const r = await queueCheck(db, storage, stored, {
      bedId,
      userId: actor.user.id,
      name,
      referenceMm: fields.data.referenceMm,
      corners: fields.data.corners,
      distances: fields.data.distances,
      title: fields.data.title ?? null,
    });
    stored = undefined; // recorded (queueCheck cleans up itself when it fails)
    return { check: { id: r.check.id, status: r.check.status }, photo: { id: r.photo.id, duplicate: !r.photoCreated }, reused: r.reusedCheck };
  } catch (e) {
    if (stored) await discardUpload(db, storage, stored);
    if (e instanceof IntakeError) throw toAppError(e);
    if (e instanceof MultipartError) throw invalidInput(`The upload could not be read: ${e.message} Try again.`, { photo: e.message });
    throw e;
  }
}

/** `GET /api/checks/{id}` */
export async function getCheckStatus(db: Db, actor: Actor, id: string): Promise<CheckStatusView> {
  authorize(actor, 'workshop:read');
  const row = await getCheck(db, actor.workshopId, id);
  if (!row) throw notFound('check');
  return checkStatusView(row);
}

/** The check's report revision once it is done (404 outside the actor's workshop, 409 until done). */
async function finishedRef(db: Db, actor: Actor, id: string): Promise<{ id: string; reportRev: number }> {
  const row = await getCheckReportRef(db, actor.workshopId, id);
  if (!row) throw notFound('check');
  if (!row.hasReport || (row.status !== 'done' && row.status !== 'needs-review')) {
    const why = row.status === 'failed' ? `The analysis failed: ${row.error ?? 'no reason recorded'}` : `The check is ${row.status}; the report is ready once it is done.`;
    throw new AppError('not_ready', 409, why);
  }
  return row;
}

// the report text changed or went between the two reads (a re-fit just started): as if not done yet
const notReadyNow = () => new AppError('not_ready', 409, 'The check is being analysed again; the report is ready once it is done.');

async function finishedReport(db: Db, actor: Actor, id: string): Promise<Report> {
  const ref = await finishedRef(db, actor, id);
  // validated once per report revision (lib/checks/report-cache.ts); the text is read only on a miss
  const report = await reportAt(ref.id, ref.reportRev, () => getCheckReportText(db, actor.workshopId, ref.id));
  if (!report) throw notReadyNow();
  return report;
}

/** The same report as JSON bytes, validated, serialised and encoded once per revision (the report route sends it). */
export async function getCheckReportJson(db: Db, actor: Actor, id: string): Promise<Uint8Array<ArrayBuffer>> {
  authorize(actor, 'workshop:read');
  const ref = await finishedRef(db, actor, id);
  const body = await reportBodyAt(ref.id, ref.reportRev, () => getCheckReportText(db, actor.workshopId, ref.id));
  if (!body) throw notReadyNow();
  return body;
}

/** `GET /api/checks/{id}/report`: the measurement core's report JSON; 409 until the check is done. */
export async function getCheckReport(db: Db, actor: Actor, id: string): Promise<Report> {
  authorize(actor, 'workshop:read');
  return finishedReport(db, actor, id);
}

/** `GET /api/beds/{bedId}/checks`: the bed's checks, newest first, with their summary figures. */
export async function listChecks(db: Db, actor: Actor, bedId: string): Promise<CheckListRow[]> {
  authorize(actor, 'workshop:read');
  const bed = await getBed(db, actor.workshopId, bedId);
  if (!bed) throw notFound('bed');
  return listBedChecks(db, actor.workshopId, bedId);
}

/** `GET /api/checks/{a}/compare/{b}`: what changed from check a to check b (same bed), by the measurement core. */
export async function compareChecks(db: Db, actor: Actor, a: string, b: string): Promise<{ before: string; after: string; comparison: Comparison }> {
  authorize(actor, 'workshop:read');
  const [ra, rb] = await Promise.all([getCheck(db, actor.workshopId, a), getCheck(db, actor.workshopId, b)]);
  if (!ra || !rb) throw notFound('check');
  if (ra.bedId !== rb.bedId) throw invalidInput('Only two checks of the same bed can be compared.');
  const [before, after] = await Promise.all([finishedReport(db, actor, a), finishedReport(db, actor, b)]);
  return { before: a, after: b, comparison: compareReports(before, after) };
}

export const RefitBodySchema = z.object({
  detections: PointsSchema.superRefine((d, ctx) => {
    // every point must lie on the photo (image px, origin top-left): a point off it cannot be a detection
    const off = (x: number, y: number) => x < 0 || y < 0 || x > d.image.width || y > d.image.height;
    d.reference.corners.forEach(([x, y], i) => {
      if (off(x, y)) ctx.addIssue({ code: 'custom', path: ['reference', 'corners', i], message: `Corner ${i + 1} is outside the ${d.image.width} × ${d.image.height} px photo.` });
    });
    const i = d.holes.findIndex((h) => off(h.x, h.y));
    if (i >= 0) ctx.addIssue({ code: 'custom', path: ['holes', i], message: `Hole ${i + 1} at (${Math.round(d.holes[i]!.x)}, ${Math.round(d.holes[i]!.y)}) px is outside the ${d.image.width} × ${d.image.height} px photo.` });
  }),
  edits: z.unknown().optional(),
});

/** `POST /api/checks/{id}/refit` {detections, edits?}: store the reviewer's edits and queue a fit → 202. */
export async function refitCheck(db: Db, actor: Actor, id: string, body: z.infer<typeof RefitBodySchema>): Promise<{ check: { id: string; status: string } }> {
  authorize(actor, 'check:review');
  try {
    const { check } = await requestRefit(db, { workshopId: actor.workshopId, checkId: id, userId: actor.user.id, detections: body.detections, edits: body.edits ?? null });
    return { check: { id: check.id, status: check.status } };
  } catch (e) {
    if (e instanceof CheckStateError) {
      if (e.code === 'not-found') throw notFound('check');
      throw conflict(e.message);
    }
    throw e;
  }
}
