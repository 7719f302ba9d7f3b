/**
 * Share links: read-only links to one check's report. Only the SHA-256 (hex) of a link's token is stored;
 * a link is live while it is neither revoked nor past `expiresAt` (ms since the Unix epoch). No cookies here.
 */
import { and, desc, eq, gt, isNull, sql } from 'drizzle-orm';
import { beds, checks, shareLinks } from '@/db/schema';
import { hasReportSql } from './checks';
import { newId, type Queryable } from './types';

export type ShareLinkRow = typeof shareLinks.$inferSelect;

export async function insertShareLink(
  db: Queryable,
  input: { workshopId: string; checkId: string; tokenHash: string; createdBy: string; expiresAt: number; label: string | null },
): Promise<ShareLinkRow> {
  const [row] = await db.insert(shareLinks).values({ id: newId(), ...input }).returning();
  if (!row) throw new Error('insertShareLink returned no row');
  return row;
}

/**
 * The live link with this token hash at `now` joined to its check and bed (the same workshop as the link's,
 * enforced in the join), with only the columns a shared report shows: one indexed read per opening (the
 * unique token index, then two primary keys), no photo, detections or edits blobs and not the report text
 * either (its revision names it; lib/checks/report-cache.ts reads it once). Undefined when the link is
 * unknown, revoked or expired, or its check is gone.
 */
export async function findLiveSharedCheck(db: Queryable, tokenHash: string, now = Date.now()) {
  const [row] = await db
    .select({
      linkId: shareLinks.id, workshopId: shareLinks.workshopId, checkId: shareLinks.checkId, expiresAt: shareLinks.expiresAt,
      status: checks.status, title: checks.title, finishedAt: checks.finishedAt, createdAt: checks.createdAt,
      hasReport: hasReportSql, reportRev: checks.reportRev, bedName: beds.name, bedId: checks.bedId, patternId: checks.patternId,
    })
    .from(shareLinks)
    .innerJoin(checks, and(eq(checks.id, shareLinks.checkId), eq(checks.workshopId, shareLinks.workshopId)))
    .leftJoin(beds, and(eq(beds.id, checks.bedId), eq(beds.workshopId, shareLinks.workshopId)))
    .where(and(eq(shareLinks.tokenHash, tokenHash), isNull(shareLinks.revokedAt), gt(shareLinks.expiresAt, now)))
    .limit(1);
  return row;
}

/** Any link with this token hash, live or not (to tell "gone" from "never existed"). */
export async function findShareLinkByTokenHash(db: Queryable, tokenHash: string): Promise<ShareLinkRow | undefined> {
  const [row] = await db.select().from(shareLinks).where(eq(shareLinks.tokenHash, tokenHash)).limit(1);
  return row;
}

export async function getShareLink(db: Queryable, workshopId: string, id: string): Promise<ShareLinkRow | undefined> {
  const [row] = await db.select().from(shareLinks).where(and(eq(shareLinks.workshopId, workshopId), eq(shareLinks.id, id))).limit(1);
  return row;
}

/** A check's links, newest first (live and dead: the page shows both). */
export async function listShareLinks(db: Queryable, workshopId: string, checkId: string): Promise<ShareLinkRow[]> {
  return db
    .select()
    .from(shareLinks)
    .where(and(eq(shareLinks.workshopId, workshopId), eq(shareLinks.checkId, checkId)))
    .orderBy(desc(shareLinks.createdAt));
}

/** Revokes a link of the workshop; false when there is none or it was revoked already. */
export async function revokeShareLink(db: Queryable, workshopId: string, id: string, now = Date.now()): Promise<boolean> {
  const rows = await db
    .update(shareLinks)
    .set({ revokedAt: now })
    .where(and(eq(shareLinks.workshopId, workshopId), eq(shareLinks.id, id), isNull(shareLinks.revokedAt)))
    .returning({ id: shareLinks.id });
  return rows.length > 0;
}

/** Counts one view: one atomic UPDATE by primary key, nothing read back (a shared page calls it per opening). */
export async function recordShareLinkView(db: Queryable, id: string, now = Date.now()): Promise<void> {
  await db.update(shareLinks).set({ viewCount: sql`${shareLinks.viewCount} + 1`, lastViewedAt: now }).where(eq(shareLinks.id, id));
}
