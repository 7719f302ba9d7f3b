import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { listMembers } from '@/db/queries/memberships';
import { signIn } from '@/lib/services/auth';
import { listBeds } from '@/lib/services/beds';
import { DEMO_LOGINS, DEMO_PASSWORD, seedDemo } from '@/lib/services/demo';
import { useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
beforeAll(async () => {
  t = await useFreshDatabase();
});
afterAll(async () => t.close());

describe('demo seed', () => {
  it('seeds an empty database once: owner and reviewer who can sign in, and beds with patterns', async () => {
    const first = await seedDemo(t.db);
    expect(first.seeded).toBe(true);
    expect((await seedDemo(t.db)).seeded).toBe(false);
    const members = await listMembers(t.db, first.workshopId!);
    expect(members.map((m) => m.role).sort()).toEqual(['owner', 'reviewer']);
    for (const login of DEMO_LOGINS) {
      const r = await signIn(t.db, { email: login.email, password: DEMO_PASSWORD });
      expect(r.workshopId).toBe(first.workshopId);
    }
    const owner = members.find((m) => m.role === 'owner')!;
    const beds = await listBeds(t.db, { user: { id: owner.userId, email: owner.email, name: owner.name, units: 'mm' }, workshopId: first.workshopId!, role: 'owner' });
    expect(beds.length).toBeGreaterThanOrEqual(1);
    expect(beds.every((b) => (b.pattern?.positions ?? 0) > 0)).toBe(true);
  });
});
