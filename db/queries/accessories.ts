/** A workshop's accessory library (spec JSON validated by lib/services/accessories.ts). No cookies here. */
import { and, asc, eq } from 'drizzle-orm';
import { accessories } from '@/db/schema';
import { newId, type Queryable } from './types';

export type AccessoryRow = typeof accessories.$inferSelect;

export async function insertAccessory(
  db: Queryable,
  input: { workshopId: string; name: string; presetId: string | null; specJson: string; createdBy: string },
): Promise<AccessoryRow> {
  const [row] = await db.insert(accessories).values({ id: newId(), ...input }).returning();
  if (!row) throw new Error('insertAccessory returned no row');
  return row;
}

export async function listAccessories(db: Queryable, workshopId: string): Promise<AccessoryRow[]> {
  return db.select().from(accessories).where(eq(accessories.workshopId, workshopId)).orderBy(asc(accessories.name), asc(accessories.createdAt));
}

export async function getAccessory(db: Queryable, workshopId: string, id: string): Promise<AccessoryRow | undefined> {
  const [row] = await db.select().from(accessories).where(and(eq(accessories.workshopId, workshopId), eq(accessories.id, id))).limit(1);
  return row;
}

export async function updateAccessory(db: Queryable, workshopId: string, id: string, input: { name: string; specJson: string }): Promise<AccessoryRow | undefined> {
  const [row] = await db.update(accessories).set(input).where(and(eq(accessories.workshopId, workshopId), eq(accessories.id, id))).returning();
  return row;
}

export async function deleteAccessory(db: Queryable, workshopId: string, id: string): Promise<boolean> {
  const rows = await db.delete(accessories).where(and(eq(accessories.workshopId, workshopId), eq(accessories.id, id))).returning({ id: accessories.id });
  return rows.length > 0;
}
