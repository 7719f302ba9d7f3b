/** A workshop with a user and a bed whose pattern is set, on a real migrated database (for checks tests). */
import { eq } from 'drizzle-orm';
import type { Db } from '@/db/client';
import { beds, memberships, patterns, users, workshops } from '@/db/schema';
import type { Pattern } from '@/lib/geometry/contract';

/** A small dog-hole bed: 4 × 3 holes of 20 mm at 96 mm pitch (a common dog-hole grid, common practice). */
export const SMALL_PATTERN: Pattern = {
  version: 1,
  name: 'test bed',
  units: 'mm',
  bed: { width: 500, height: 400 },
  families: [{
    id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 100, y: 100 }, pitch: { x: 96, y: 96 }, count: { x: 4, y: 3 },
    fit: { toleranceMm: 0.5 },
  }],
};

/**
 * A bed of 20 mm dog holes on a 96 mm grid (a common dog-hole grid, common practice), ten columns from X = 48 mm,
 * `rows` rows from Y = `originYMm`, in two panels L and R that meet at X = 480 mm.
 */
export function twoPanelDogBed(name: string, o: { heightMm: number; originYMm: number; rows: number; toleranceMm: number }): Pattern {
  return {
    version: 1,
    name,
    units: 'mm',
    bed: { width: 960, height: o.heightMm },
    families: [{
      id: 'dog', kind: 'dog-hole', holeDiameter: 20, origin: { x: 48, y: o.originYMm }, pitch: { x: 96, y: 96 }, count: { x: 10, y: o.rows }, fit: { toleranceMm: o.toleranceMm },
    }],
    panels: [{ id: 'L', x: 0, y: 0, width: 480, height: o.heightMm }, { id: 'R', x: 480, y: 0, width: 480, height: o.heightMm }],
  };
}

export interface Shop { workshopId: string; userId: string; bedId: string; patternId: string }

export async function makeShop(db: Db, name = 'shop', pattern: Pattern | null = SMALL_PATTERN): Promise<Shop> {
  const workshopId = crypto.randomUUID();
  const userId = crypto.randomUUID();
  const bedId = crypto.randomUUID();
  const patternId = crypto.randomUUID();
  await db.insert(workshops).values({ id: workshopId, name });
  await db.insert(users).values({ id: userId, email: `${userId}@example.test`, name: 'Mach', passwordHash: 'x' });
  await db.insert(memberships).values({ workshopId, userId, role: 'machinist' });
  await db.insert(beds).values({ id: bedId, workshopId, name: 'bed' });
  if (pattern) {
    await db.insert(patterns).values({ id: patternId, bedId, revision: 1, json: JSON.stringify(pattern) });
    await db.update(beds).set({ currentPatternId: patternId }).where(eq(beds.id, bedId));
  }
  return { workshopId, userId, bedId, patternId };
}
