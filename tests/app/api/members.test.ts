import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { POST as acceptPost } from '@/app/api/invitations/accept/route';
import { DELETE as memberDelete, PATCH as memberPatch } from '@/app/api/members/[userId]/route';
import { GET as membersGet, POST as membersPost } from '@/app/api/members/route';
import { GET as meGet } from '@/app/api/me/route';
import { startSession } from '@/lib/auth/session';
import { addMember, call, cookieFrom, newOwner, uniqueEmail, useFreshDatabase, type WebTestDb } from '@/tests/web/helpers';

let t: WebTestDb;
beforeAll(async () => {
  t = await useFreshDatabase();
});
afterAll(async () => t.close());

const cookieOf = async (userId: string, workshopId: string) => `gp_session=${await startSession(t.db, { userId, workshopId })}`;

describe('members API', () => {
  it('lets an owner invite (201 with a copyable link on this host) and the invitee join through the link', async () => {
    const owner = await newOwner(t.db, 'Invite Shop');
    const cookie = await cookieOf(owner.user.id, owner.workshopId);
    const email = uniqueEmail('joiner');
    const r = await call(membersPost, { cookie, body: { email, role: 'machinist' } });
    expect(r.status).toBe(201);
    const link = (r.json as { link: string }).link;
    expect(link).toMatch(/^http:\/\/gridproof\.test\/invite\/[A-Za-z0-9_-]{40,}$/);
    const joined = await call(acceptPost, { body: { token: link.split('/invite/')[1], name: 'Joiner', password: 'a long new password' } });
    expect(joined.status).toBe(200);
    const me = await call(meGet, { cookie: cookieFrom(joined.setCookie) });
    expect(me.json).toMatchObject({ role: 'machinist', workshopId: owner.workshopId });
    const list = await call(membersGet, { cookie });
    expect((list.json as { members: { email: string }[] }).members.map((m) => m.email)).toContain(email);
  });

  it("refuses a machinist's invitation and role change with 403", async () => {
    const owner = await newOwner(t.db);
    const machinist = await addMember(t.db, owner.workshopId, 'machinist');
    const cookie = await cookieOf(machinist.user.id, owner.workshopId);
    expect((await call(membersPost, { cookie, body: { email: uniqueEmail('x'), role: 'owner' } })).status).toBe(403);
    expect((await call(memberPatch, { method: 'PATCH', cookie, params: { userId: machinist.user.id }, body: { role: 'owner' } })).status).toBe(403);
  });

  it('changes a role and removes a member; the removed member no longer acts in the workshop', async () => {
    const owner = await newOwner(t.db);
    const cookie = await cookieOf(owner.user.id, owner.workshopId);
    const reviewer = await addMember(t.db, owner.workshopId, 'reviewer');
    const reviewerCookie = await cookieOf(reviewer.user.id, owner.workshopId);
    expect((await call(memberPatch, { method: 'PATCH', cookie, params: { userId: reviewer.user.id }, body: { role: 'machinist' } })).status).toBe(200);
    expect((await call(meGet, { cookie: reviewerCookie })).json).toMatchObject({ role: 'machinist' });
    expect((await call(memberDelete, { method: 'DELETE', cookie, params: { userId: reviewer.user.id } })).status).toBe(200);
    expect((await call(membersGet, { cookie: reviewerCookie })).status).toBe(403);
  });

  it('answers 422 for an unknown role', async () => {
    const owner = await newOwner(t.db);
    const cookie = await cookieOf(owner.user.id, owner.workshopId);
    const r = await call(membersPost, { cookie, body: { email: uniqueEmail('r'), role: 'admin' } });
    expect(r.status).toBe(422);
    expect(r.json).toMatchObject({ error: { fields: { role: expect.any(String) } } });
  });
});
