/**
 * The demo workshop (invented): Cedar Row Workshop, a two-person cabinet shop with one CNC router. Wren,
 * the owner, looks after the router's spoilboard — M8 inserts on a 100 mm grid in four strips — and an
 * assembly table with 20 mm dog holes. Juno does the finishing and reviews the bed reports before a big job.
 * Seeded only into an empty database; its logins are shown on the sign-in page in demo mode.
 */
import type { Db } from '@/db/client';
import { recordAudit } from '@/db/queries/audit';
import { insertMembership } from '@/db/queries/memberships';
import { insertUser } from '@/db/queries/users';
import { countWorkshops, insertWorkshop } from '@/db/queries/workshops';
import { hashPassword } from '@/lib/auth/password';
import type { Actor } from './actor';
import { createBed } from './beds';
import { DEMO_LOGINS, DEMO_PASSWORD, DEMO_WORKSHOP_NAME } from './demo-accounts';

export { DEMO_LOGINS, DEMO_PASSWORD, DEMO_WORKSHOP_NAME };

/** Seeds the demo workshop if the database has no workshop at all; returns whether it did. */
export async function seedDemo(db: Db): Promise<{ seeded: boolean; workshopId?: string; owner?: Actor }> {
  if ((await countWorkshops(db)) > 0) return { seeded: false };
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const { workshopId, ownerId } = await db.transaction(async (tx) => {
    const ws = await insertWorkshop(tx, { name: DEMO_WORKSHOP_NAME, demo: true });
    let ownerId = '';
    for (const login of DEMO_LOGINS) {
      const u = await insertUser(tx, { email: login.email, name: login.name, passwordHash });
      await insertMembership(tx, { workshopId: ws.id, userId: u.id, role: login.role });
      if (login.role === 'owner') ownerId = u.id;
    }
    await recordAudit(tx, { workshopId: ws.id, actorId: ownerId, action: 'demo.seed' });
    return { workshopId: ws.id, ownerId };
  });
  const owner: Actor = { user: { id: ownerId, email: DEMO_LOGINS[0]!.email, name: 'Wren', units: 'mm' as const }, workshopId, role: 'owner' as const };
  await createBed(db, owner, {
    name: 'Main router spoilboard',
    notes: 'MDF spoilboard in four strips on the aluminium frame; last faced in spring.',
    preset: { preset: 'm8-100', bedWidthMm: 1220, bedHeightMm: 2440, stripWidthMm: 610 },
  });
  await createBed(db, owner, {
    name: 'Assembly table',
    notes: 'Dog-hole top beside the router, used for glue-ups and fixtures.',
    preset: { preset: 'g96-d20', bedWidthMm: 1200, bedHeightMm: 800 },
  });
  return { seeded: true, workshopId, owner };
}
