/** Saved versions of a bed's nominal pattern. `json` is the measurement core's Pattern JSON as given. */
import { and, desc, eq } from 'drizzle-orm';
import { patterns } from '@/db/schema';
import { newId, type Queryable } from './types';

export type PatternRow = typeof patterns.$inferSelect;

/** Saves the next revision of the bed's pattern (1, 2, …). */
export async function insertPatternRevision(
  db: Queryable,
  input: { bedId: string; json: string; presetId?: string | null; createdBy: string | null },
): Promise<PatternRow> {
  const [last] = await db.select({ revision: patterns.revision }).from(patterns).where(eq(patterns.bedId, input.bedId)).orderBy(desc(patterns.revision)).limit(1);
  const [row] = await db
    .insert(patterns)
    .values({ id: newId(), bedId: input.bedId, revision: (last?.revision ?? 0) + 1, presetId: input.presetId ?? null, json: input.json, createdBy: input.createdBy })
    .returning();
  if (!row) throw new Error('insertPatternRevision returned no row');
  return row;
}

export async function getPattern(db: Queryable, bedId: string, id: string): Promise<PatternRow | undefined> {
  const [row] = await db.select().from(patterns).where(and(eq(patterns.bedId, bedId), eq(patterns.id, id))).limit(1);
  return row;
}

export async function listPatternRevisions(db: Queryable, bedId: string) {
  return db
    .select({ id: patterns.id, revision: patterns.revision, presetId: patterns.presetId, createdAt: patterns.createdAt })
    .from(patterns)
    .where(eq(patterns.bedId, bedId))
    .orderBy(desc(patterns.revision));
}
