/** Workshops (a user's shop; every bed, photo and check belongs to one). */
import { eq } from 'drizzle-orm';
import { workshops } from '@/db/schema';
import { newId, type Queryable } from './types';

export type WorkshopRow = typeof workshops.$inferSelect;

export async function insertWorkshop(db: Queryable, input: { name: string; demo?: boolean }): Promise<WorkshopRow> {
  const [row] = await db.insert(workshops).values({ id: newId(), name: input.name.trim(), demo: input.demo ?? false }).returning();
  if (!row) throw new Error('insertWorkshop returned no row');
  return row;
}

export async function getWorkshop(db: Queryable, id: string): Promise<WorkshopRow | undefined> {
  const [row] = await db.select().from(workshops).where(eq(workshops.id, id)).limit(1);
  return row;
}

export async function renameWorkshop(db: Queryable, id: string, name: string): Promise<void> {
  await db.update(workshops).set({ name: name.trim() }).where(eq(workshops.id, id));
}

export async function countWorkshops(db: Queryable): Promise<number> {
  const rows = await db.select({ id: workshops.id }).from(workshops).limit(1);
  return rows.length;
}
