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
import { createAccessory } from './accessories';
import { createBed } from './beds';
import { DEMO_LOGINS, DEMO_PASSWORD, DEMO_WORKSHOP_NAME } from './demo-accounts';

export { DEMO_LOGINS, DEMO_PASSWORD, DEMO_WORKSHOP_NAME };

/**
 * Two accessories of the demo's jig plate (M6 inserts on 50 mm, 600 × 400 mm), built from our presets: a
 * sign-blank fence on two bolts four steps apart, which drops in wherever its two inserts are true, and a
 * carrier board bolted through twelve inserts (4 × 3), which binds on the fresh install wherever it covers one
 * of the four inserts drilled 1.2 mm off (far beyond an M6 bolt's 0.3 mm radial clearance in a medium-fit hole)
 * and fits once they are redrilled. The placement map shows where each one goes.
 */
export const DEMO_ACCESSORIES = [
  { name: 'Sign-blank fence (M6, 200 mm)', preset: 'fence-two-bolt', params: { spanSteps: 4, fastener: 'M6' } },
  { name: 'Sign-blank carrier board (M6, 12 bolts)', preset: 'sacrificial-board', params: { widthMm: 200, heightMm: 150, pitchXMm: 50, pitchYMm: 50, fastener: 'M6' } },
] as const;

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
  for (const a of DEMO_ACCESSORIES) await createAccessory(db, owner, { name: a.name, preset: a.preset, params: { ...a.params } });
  return { seeded: true, workshopId, owner };
}
