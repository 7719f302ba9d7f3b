/**
 * The one-query session read every signed-in request makes, on a real migrated SQLite file: the live session
 * with its user and every workshop of the user (oldest membership first, the role as stored now), nothing for
 * a revoked or expired session, and a session of a user in no workshop still answers (with no workshops).
 */
import { setTimeout as delay } from 'node:timers/promises';
import { afterAll, describe, expect, it } from 'vitest';
import { updateMembershipRole, insertMembership } from '@/db/queries/memberships';
import { getLiveSessionAuth, insertSession, revokeSession } from '@/db/queries/sessions';
import { insertUser } from '@/db/queries/users';
import { insertWorkshop } from '@/db/queries/workshops';
import { tempDb } from '@/tests/queue/helpers';
import { uniqueEmail } from '@/tests/web/helpers';

const t = await tempDb();
afterAll(() => t.close());

describe('live session read', () => {
  it('answers the user and every workshop, oldest membership first, with the role as it is now', async () => {
    const user = await insertUser(t.db, { email: uniqueEmail('two-shops'), name: 'Ada', passwordHash: 'x' });
    const first = await insertWorkshop(t.db, { name: 'Lathe corner' });
    await insertMembership(t.db, { workshopId: first.id, userId: user.id, role: 'reviewer' });
    await delay(5); // a later createdAt for the second membership
    const second = await insertWorkshop(t.db, { name: 'Sign bay' });
    await insertMembership(t.db, { workshopId: second.id, userId: user.id, role: 'owner' });
    const s = await insertSession(t.db, { userId: user.id, expiresAt: Date.now() + 60_000 });
    const live = await getLiveSessionAuth(t.db, s.id);
    expect(live?.user).toEqual({ id: user.id, email: user.email, name: 'Ada', units: 'mm' });
    expect(live?.workshops).toEqual([
      { workshopId: first.id, name: 'Lathe corner', role: 'reviewer' },
      { workshopId: second.id, name: 'Sign bay', role: 'owner' },
    ]);
    await updateMembershipRole(t.db, first.id, user.id, 'machinist');
    expect((await getLiveSessionAuth(t.db, s.id))?.workshops[0]?.role).toBe('machinist');
  });

  it('answers a user in no workshop with no workshops', async () => {
    const user = await insertUser(t.db, { email: uniqueEmail('no-shop'), name: 'Bo', passwordHash: 'x' });
    const s = await insertSession(t.db, { userId: user.id, expiresAt: Date.now() + 60_000 });
    const live = await getLiveSessionAuth(t.db, s.id);
    expect(live?.session.id).toBe(s.id);
    expect(live?.workshops).toEqual([]);
  });

  it('answers nothing for a revoked, an expired or an unknown session', async () => {
    const user = await insertUser(t.db, { email: uniqueEmail('gone'), name: 'Cy', passwordHash: 'x' });
    const revoked = await insertSession(t.db, { userId: user.id, expiresAt: Date.now() + 60_000 });
    await revokeSession(t.db, revoked.id);
    const expired = await insertSession(t.db, { userId: user.id, expiresAt: Date.now() - 1 });
    expect(await getLiveSessionAuth(t.db, revoked.id)).toBeUndefined();
    expect(await getLiveSessionAuth(t.db, expired.id)).toBeUndefined();
    expect(await getLiveSessionAuth(t.db, crypto.randomUUID())).toBeUndefined();
  });
});
