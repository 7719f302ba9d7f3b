/**
 * Share links: a read-only link to one check's report for someone without an account. The token is 32 random
 * bytes (256 bits) in base64url; only its SHA-256 is stored, so the link is shown once, when made. A link
 * expires (1–90 days) and can be revoked; each opening counts a view. Through a link one sees the report
 * (without the photo's data: see publicReport), the bed's name, the check's title and time, the fits of its
 * pattern's families (for the method note) and the check's comments — nothing else of the workshop.
 *
 * "Send to a helper": the link and the report mail (verdict, the sender's note, the deviation map) are
 * written in one transaction, so the mail exists exactly when the link does.
 */
import { createHash, randomBytes } from 'node:crypto';
import { z } from 'zod';
import type { Db } from '@/db/client';
import { recordAudit } from '@/db/queries/audit';
import { getCheck, getCheckReportText } from '@/db/queries/checks';
import { listComments, type CommentView } from '@/db/queries/comments';
import { hitRateLimit } from '@/db/queries/rate-limits';
import * as q from '@/db/queries/share-links';
import { getWorkshop } from '@/db/queries/workshops';
import { photoNote } from '@/lib/report/photo-note';
import type { Report } from '@/lib/geometry/contract';
import { decimalIn } from '@/lib/http/decimal';
import { AppError, notFound } from '@/lib/http/errors';
import { queueMail, reportMailFromReport } from '@/lib/mail';
import { reportAt } from '@/lib/checks/report-cache';
import { authorize, type Actor } from './actor';
import { EmailSchema } from './auth';
import type { FitFamily } from '@/lib/report/method-note';
import { loadFinishedCheck, loadFitFamilies, publicReport, withStoredOutline } from './share-report';

export const SHARE_DEFAULT_DAYS = 14;
export const SHARE_MAX_DAYS = 90;
/** Report mails one person may send per hour (the address is theirs to choose: keep it from becoming a spam relay). */
export const SEND_LIMIT_PER_HOUR = 30;
const DAY_MS = 24 * 3600 * 1000;

/** base64url of 32 bytes: 43 characters. */
export const SHARE_TOKEN_PATTERN = /^[A-Za-z0-9_-]{43}$/;

const ShareExpirySchema = z.object({
  expiresInDays: decimalIn('expiresInDays', 1, SHARE_MAX_DAYS, 'days', true).default(SHARE_DEFAULT_DAYS),
});
export const ShareCreateSchema = ShareExpirySchema.extend({
  /** Who the link is for ("Sam at the sign shop"), so that two links can be told apart in the list. */
  label: z.string().trim().max(120).transform((s) => s || undefined).optional(),
});
export const ShareSendSchema = ShareExpirySchema.extend({
  email: EmailSchema,
  note: z.string().trim().max(2000).optional(),
});

export const hashShareToken = (token: string): string => createHash('sha256').update(token).digest('hex');
export const newShareToken = (): string => randomBytes(32).toString('base64url');
export const shareUrl = (baseUrl: string, token: string): string => `${baseUrl.replace(/\/$/, '')}/s/${token}`;

/** `label`: who the link is for (the address a sent link went to, or the maker's words); null when not given. */
export type ShareLinkDto = { id: string; label: string | null; createdAt: number; expiresAt: number; revokedAt: number | null; viewCount: number; lastViewedAt: number | null; live: boolean };

function toDto(r: q.ShareLinkRow, now = Date.now()): ShareLinkDto {
  return { id: r.id, label: r.label, createdAt: r.createdAt, expiresAt: r.expiresAt, revokedAt: r.revokedAt, viewCount: r.viewCount, lastViewedAt: r.lastViewedAt, live: !r.revokedAt && r.expiresAt > now };
}

/** `POST /api/checks/{id}/share`: a new link, its URL shown this once. Owner or machinist; report must be ready. */
export async function createShareLink(db: Db, actor: Actor, checkId: string, input: z.infer<typeof ShareCreateSchema>, baseUrl: string) {
  authorize(actor, 'workshop:read');
  await loadFinishedCheck(db, actor.workshopId, checkId);
  authorize(actor, 'share:manage');
  const token = newShareToken();
  const row = await db.transaction(async (tx) => {
    const r = await q.insertShareLink(tx, { workshopId: actor.workshopId, checkId, tokenHash: hashShareToken(token), createdBy: actor.user.id, expiresAt: Date.now() + input.expiresInDays * DAY_MS, label: input.label ?? null });
    await recordAudit(tx, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'share.create', targetType: 'share_link', targetId: r.id, detail: { checkId, expiresInDays: input.expiresInDays } });
    return r;
  });
  return { link: { id: row.id, url: shareUrl(baseUrl, token), expiresAt: row.expiresAt } };
}

/** `POST /api/checks/{id}/send`: a link and the report mail to a helper, in one transaction. */
export async function sendReportToHelper(db: Db, actor: Actor, checkId: string, input: z.infer<typeof ShareSendSchema>, baseUrl: string) {
  authorize(actor, 'workshop:read');
  const { check, report, bedName } = await loadFinishedCheck(db, actor.workshopId, checkId);
  authorize(actor, 'share:manage');
  const limit = await hitRateLimit(db, `share-send:${actor.user.id}`, 3600e3);
  if (limit.count > SEND_LIMIT_PER_HOUR) throw new AppError('rate_limited', 429, `You have sent ${SEND_LIMIT_PER_HOUR} reports in the last hour; try again later.`);
  const [workshop, fits] = await Promise.all([getWorkshop(db, actor.workshopId), loadFitFamilies(db, check)]);
  const token = newShareToken();
  // the mail and the page it links to write lengths in the sender's unit
  const units = actor.user.units;
  const url = `${shareUrl(baseUrl, token)}${units === 'in' ? '?units=in' : ''}`;
  const expiresAt = Date.now() + input.expiresInDays * DAY_MS;
  const mail = await reportMailFromReport({
    report: publicReport(report),
    units,
    fits,
    workshopName: workshop?.name ?? 'Workshop',
    senderName: actor.user.name,
    bedName,
    checkTitle: check.title,
    linkUrl: url,
    linkExpiresAt: expiresAt,
    note: input.note ?? null,
  });
  const row = await db.transaction(async (tx) => {
    const r = await q.insertShareLink(tx, { workshopId: actor.workshopId, checkId, tokenHash: hashShareToken(token), createdBy: actor.user.id, expiresAt, label: input.email });
    const mailId = await queueMail(tx, input.email, 'report', mail, actor.workshopId);
    await recordAudit(tx, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'share.send', targetType: 'share_link', targetId: r.id, detail: { checkId, to: input.email, mailId } });
    return r;
  });
  return { link: { id: row.id, url, expiresAt: row.expiresAt }, sentTo: input.email };
}

/** `GET /api/checks/{id}/share`: the check's links (without tokens), newest first. */
export async function listShareLinks(db: Db, actor: Actor, checkId: string): Promise<ShareLinkDto[]> {
  authorize(actor, 'workshop:read');
  // another workshop's check is not found (404), not an empty list
  if (!(await getCheck(db, actor.workshopId, checkId))) throw notFound('check');
  const now = Date.now();
  return (await q.listShareLinks(db, actor.workshopId, checkId)).map((r) => toDto(r, now));
}

/** `DELETE /api/share-links/{id}`: the link stops working at once. */
export async function revokeShareLink(db: Db, actor: Actor, id: string): Promise<void> {
  authorize(actor, 'workshop:read');
  const row = await q.getShareLink(db, actor.workshopId, id);
  if (!row) throw notFound('share link');
  authorize(actor, 'share:manage');
  await q.revokeShareLink(db, actor.workshopId, id);
  await recordAudit(db, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'share.revoke', targetType: 'share_link', targetId: id });
}

export type SharedComment = Pick<CommentView, 'id' | 'positionLabel' | 'body' | 'createdAt'> & { authorName: string | null };

/** What a share link shows. Nothing here identifies the photo or reaches the rest of the workshop. */
export interface SharedReportView {
  bedName: string;
  checkTitle: string | null;
  checkedAt: number | null;
  expiresAt: number;
  report: Report;
  /** The photo's problems in words, when it had any (lib/report/photo-note.ts): names only, no figure of the photo. */
  photoNote: string | null;
  /** The pattern's families for the method note (names, fits, hole diameters: the bed's, not the photo's); null when the pattern is gone. */
  fits: FitFamily[] | null;
  comments: SharedComment[];
}

const gone = () => new AppError('share_link_gone', 410, 'This link was revoked or has expired. Ask whoever sent it for a new one.');
const unknown = () => new AppError('not_found', 404, 'No report is shared at this address.');

/**
 * Opens a shared report by its token: 404 for a malformed or unknown (tampered) token, 410 for a revoked or
 * expired one. `countView` counts the opening; `comments: false` leaves the comments unread (answers none).
 */
export async function openSharedReport(db: Db, token: string, opts: { countView?: boolean; comments?: boolean; now?: number } = {}): Promise<SharedReportView> {
  if (!SHARE_TOKEN_PATTERN.test(token)) throw unknown();
  const now = opts.now ?? Date.now();
  const hash = hashShareToken(token);
  // one read: the live link, its check and bed in the link's workshop, only the columns shown
  const row = await q.findLiveSharedCheck(db, hash, now);
  if (!row) {
    if (await q.findShareLinkByTokenHash(db, hash)) throw gone();
    throw unknown();
  }
  if (!row.hasReport || (row.status !== 'done' && row.status !== 'needs-review')) throw unknown();
  let report: Report;
  let note: string | null;
  try {
    const full = await reportAt(row.checkId, row.reportRev, () => getCheckReportText(db, row.workshopId, row.checkId));
    if (!full) throw unknown();
    report = sharedReportOf(full.pattern.bed ? full : await withStoredOutline(db, row, full));
    note = photoNote(full.photo?.quality);
  } catch {
    throw unknown();
  }
  const [comments, fits] = await Promise.all([
    opts.comments === false ? [] : listComments(db, row.workshopId, row.checkId),
    loadFitFamilies(db, row),
    opts.countView ? q.recordShareLinkView(db, row.linkId, now) : undefined,
  ]);
  return {
    bedName: row.bedName ?? 'Bed', checkTitle: row.title, checkedAt: row.finishedAt ?? row.createdAt, expiresAt: row.expiresAt, report, photoNote: note, fits,
    comments: comments.map((c) => ({ id: c.id, positionLabel: c.positionLabel, body: c.body, createdAt: c.createdAt, authorName: c.authorName })),
  };
}

/**
 * What a share token opens, without reading the report: 'live', 'gone' (revoked or expired: the page and the
 * JSON answer 410) or 'unknown' (malformed, tampered or never made: 404). One indexed read by the token's hash.
 */
export async function shareLinkState(db: Db, token: string, now = Date.now()): Promise<'live' | 'gone' | 'unknown'> {
  if (!SHARE_TOKEN_PATTERN.test(token)) return 'unknown';
  const link = await q.findShareLinkByTokenHash(db, hashShareToken(token));
  if (!link) return 'unknown';
  return link.revokedAt === null && link.expiresAt > now ? 'live' : 'gone';
}

// publicReport of each cached parsed report, made once: reportAt hands out the same object per report revision
const shared = new WeakMap<Report, Report>();
function sharedReportOf(r: Report): Report {
  let out = shared.get(r);
  if (!out) shared.set(r, (out = publicReport(r)));
  return out;
}

// the UTF-8 JSON of each shared report, made once per report object (so once per report revision)
const sharedBytes = new WeakMap<Report, Uint8Array>();
const utf8 = new TextEncoder();

/**
 * A shared view as UTF-8 JSON bytes, the same value as `JSON.stringify(view)` with the report written last:
 * the report (the bulk, about 90 KB for 300 positions) is serialised and encoded once per report revision,
 * only the names, times and comments each time. Bytes, not a string, so the answer is not re-encoded either.
 */
export function sharedReportViewJson(view: SharedReportView): Uint8Array<ArrayBuffer> {
  let report = sharedBytes.get(view.report);
  if (report === undefined) sharedBytes.set(view.report, (report = utf8.encode(JSON.stringify(view.report))));
  const { report: _report, ...rest } = view;
  const head = utf8.encode(`${JSON.stringify(rest).slice(0, -1)},"report":`);
  const out = new Uint8Array(head.length + report.length + 1);
  out.set(head, 0);
  out.set(report, head.length);
  out[out.length - 1] = 0x7d; // }
  return out;
}
