import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { invitations } from '@/db/schema';
import { listMembers as listMemberRows } from '@/db/queries/memberships';
import { AppError } from '@/lib/http/errors';
import { acceptInvitation, changeRole, hashToken, inviteMember, listMembers, removeMember, revokeInvitation } from '@/lib/services/members';
import { addMember, newOwner, uniqueEmail, useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
beforeAll(async () => {
  t = await useFreshDatabase();
});
afterAll(async () => t.close());

const status = async (p: Promise<unknown>) => {
  try {
    await p;
    return 200;
  } catch (err) {
    if (err instanceof AppError) return err.status;
    throw err;
  }
};

describe('members', () => {
  it('invites with a one-time link whose token is stored only as its SHA-256', async () => {
    const owner = await newOwner(t.db);
    const email = uniqueEmail('invitee');
    const { link, invitation } = await inviteMember(t.db, owner, { email, role: 'machinist' }, 'http://shop.local:3000');
    const token = link.split('/invite/')[1] ?? '';
    expect(link.startsWith('http://shop.local:3000/invite/')).toBe(true);
    expect(token.length).toBeGreaterThanOrEqual(40);
    const [row] = await t.db.select().from(invitations).where(eq(invitations.id, invitation.id));
    expect(row?.tokenHash).toBe(hashToken(token));
    expect(row?.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(JSON.stringify(row)).not.toContain(token);
  });

  it('accepts an invitation once, creating the account with the invited role', async () => {
    const owner = await newOwner(t.db);
    const email = uniqueEmail('new');
    const { link } = await inviteMember(t.db, owner, { email, role: 'reviewer' }, 'http://x');
    const token = link.split('/invite/')[1] ?? '';
    const joined = await acceptInvitation(t.db, null, { token, name: 'New Hand', password: 'another long password' });
    expect(joined.created).toBe(true);
    expect(joined.workshopId).toBe(owner.workshopId);
    const members = await listMemberRows(t.db, owner.workshopId);
    expect(members.find((m) => m.email === email)?.role).toBe('reviewer');
    expect(await status(acceptInvitation(t.db, null, { token, name: 'Again', password: 'another long password' }))).toBe(404);
  });

  it('refuses an invitation for another address to a signed-in user', async () => {
    const owner = await newOwner(t.db);
    const other = await newOwner(t.db, 'Elsewhere');
    const { link } = await inviteMember(t.db, owner, { email: uniqueEmail('someone'), role: 'machinist' }, 'http://x');
    expect(await status(acceptInvitation(t.db, other.user, { token: link.split('/invite/')[1] ?? '' }))).toBe(403);
  });

  it('stops a revoked invitation from working', async () => {
    const owner = await newOwner(t.db);
    const { link, invitation } = await inviteMember(t.db, owner, { email: uniqueEmail('rev'), role: 'machinist' }, 'http://x');
    await revokeInvitation(t.db, owner, invitation.id);
    expect(await status(acceptInvitation(t.db, null, { token: link.split('/invite/')[1] ?? '', name: 'N', password: 'another long password' }))).toBe(404);
  });

  it('lets only an owner invite, change roles and remove members', async () => {
    const owner = await newOwner(t.db);
    const machinist = await addMember(t.db, owner.workshopId, 'machinist');
    const reviewer = await addMember(t.db, owner.workshopId, 'reviewer');
    expect(await status(inviteMember(t.db, machinist, { email: uniqueEmail('x'), role: 'owner' }, 'http://x'))).toBe(403);
    expect(await status(changeRole(t.db, reviewer, reviewer.user.id, 'owner'))).toBe(403);
    expect(await status(removeMember(t.db, machinist, reviewer.user.id))).toBe(403);
    await changeRole(t.db, owner, reviewer.user.id, 'machinist');
    await removeMember(t.db, owner, machinist.user.id);
    const { members } = await listMembers(t.db, owner);
    expect(members.map((m) => [m.userId, m.role])).toEqual(expect.arrayContaining([[reviewer.user.id, 'machinist']]));
    expect(members.map((m) => m.userId)).not.toContain(machinist.user.id);
  });

  it('keeps at least one owner in a workshop', async () => {
    const owner = await newOwner(t.db);
    expect(await status(changeRole(t.db, owner, owner.user.id, 'machinist'))).toBe(409);
    expect(await status(removeMember(t.db, owner, owner.user.id))).toBe(409);
  });

  it("answers 404 for another workshop's member", async () => {
    const owner = await newOwner(t.db);
    const stranger = await newOwner(t.db, 'Stranger shop');
    expect(await status(changeRole(t.db, owner, stranger.user.id, 'reviewer'))).toBe(404);
    expect(await status(removeMember(t.db, owner, stranger.user.id))).toBe(404);
  });

  it('shows open invitations to owners only', async () => {
    const owner = await newOwner(t.db);
    const reviewer = await addMember(t.db, owner.workshopId, 'reviewer');
    await inviteMember(t.db, owner, { email: uniqueEmail('open'), role: 'machinist' }, 'http://x');
    expect((await listMembers(t.db, owner)).invitations).toHaveLength(1);
    expect((await listMembers(t.db, reviewer)).invitations).toHaveLength(0);
  });
});
