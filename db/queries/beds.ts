/**
 * Beds of a workshop. Every function takes the workshop id and filters by it, so a bed of another workshop
 * is never returned (the service answers 404). No cookies here.
 */
import { and, asc, desc, eq, sql } from 'drizzle-orm';
import { beds, checks, patterns } from '@/db/schema';
import { newId, type Queryable } from './types';

export type BedRow = typeof beds.$inferSelect;

export type BedWithPattern = BedRow & { patternJson: string | null; patternRevision: number | null; presetId: string | null };

const bedColumns = {
  id: beds.id,
  workshopId: beds.workshopId,
  name: beds.name,
  notes: beds.notes,
  currentPatternId: beds.currentPatternId,
  createdBy: beds.createdBy,
  createdAt: beds.createdAt,
  updatedAt: beds.updatedAt,
  patternJson: patterns.json,
  patternRevision: patterns.revision,
  presetId: patterns.presetId,
};

export async function listBeds(db: Queryable, workshopId: string): Promise<BedWithPattern[]> {
  return db
    .select(bedColumns)
    .from(beds)
    .leftJoin(patterns, eq(patterns.id, beds.currentPatternId))
    .where(eq(beds.workshopId, workshopId))
    .orderBy(asc(beds.name), asc(beds.createdAt));
}

export async function getBed(db: Queryable, workshopId: string, id: string): Promise<BedWithPattern | undefined> {
  const [row] = await db
    .select(bedColumns)
    .from(beds)
    .leftJoin(patterns, eq(patterns.id, beds.currentPatternId))
    .where(and(eq(beds.workshopId, workshopId), eq(beds.id, id)))
    .limit(1);
  return row;
}

export async function insertBed(db: Queryable, input: { workshopId: string; name: string; notes?: string | null; createdBy: string | null }): Promise<BedRow> {
  const [row] = await db
    .insert(beds)
    .values({ id: newId(), workshopId: input.workshopId, name: input.name, notes: input.notes ?? null, createdBy: input.createdBy })
    .returning();
  if (!row) throw new Error('insertBed returned no row');
  return row;
}

export async function updateBed(
  db: Queryable,
  workshopId: string,
  id: string,
  patch: { name?: string; notes?: string | null; currentPatternId?: string },
): Promise<boolean> {
  const rows = await db
    .update(beds)
    .set({ ...patch, updatedAt: Date.now() })
    .where(and(eq(beds.workshopId, workshopId), eq(beds.id, id)))
    .returning({ id: beds.id });
  return rows.length > 0;
}

export async function deleteBed(db: Queryable, workshopId: string, id: string): Promise<boolean> {
  const rows = await db.delete(beds).where(and(eq(beds.workshopId, workshopId), eq(beds.id, id))).returning({ id: beds.id });
  return rows.length > 0;
}

export type CheckListRow = {
  id: string;
  bedId: string;
  title: string | null;
  status: string;
  verdict: string | null;
  rmsMm: number | null;
  maxMm: number | null;
  outCount: number | null;
  createdAt: number;
  finishedAt: number | null;
};

const checkListColumns = {
  id: checks.id,
  bedId: checks.bedId,
  title: checks.title,
  status: checks.status,
  verdict: checks.verdict,
  rmsMm: checks.rmsMm,
  maxMm: checks.maxMm,
  outCount: checks.outCount,
  createdAt: checks.createdAt,
  finishedAt: checks.finishedAt,
};

/** The checks of one bed, newest first. */
export async function listBedChecks(db: Queryable, workshopId: string, bedId: string, limit = 200): Promise<CheckListRow[]> {
  return db
    .select(checkListColumns)
    .from(checks)
    .where(and(eq(checks.workshopId, workshopId), eq(checks.bedId, bedId)))
    .orderBy(desc(checks.createdAt))
    .limit(limit);
}

/** The newest check of every bed of the workshop (one row per bed that has checks). */
export async function latestChecksByBed(db: Queryable, workshopId: string): Promise<Map<string, CheckListRow>> {
  const rows = await db
    .select(checkListColumns)
    .from(checks)
    .where(
      and(
        eq(checks.workshopId, workshopId),
        sql`${checks.createdAt} = (select max(c2.created_at) from checks c2 where c2.bed_id = ${checks.bedId})`,
      ),
    );
  const out = new Map<string, CheckListRow>();
  for (const r of rows) if (!out.has(r.bedId)) out.set(r.bedId, r);
  return out;
}

/** Number of checks per bed of the workshop. */
export async function countChecksByBed(db: Queryable, workshopId: string): Promise<Map<string, number>> {
  const rows = await db
    .select({ bedId: checks.bedId, n: sql<number>`count(*)` })
    .from(checks)
    .where(eq(checks.workshopId, workshopId))
    .groupBy(checks.bedId);
  return new Map(rows.map((r) => [r.bedId, Number(r.n)]));
}
