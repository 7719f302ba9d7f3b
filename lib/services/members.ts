/**
 * Member use cases: list members and open invitations, invite (a link with a random token; only its
 * SHA-256 is stored; the link is shown once to copy and mailed, the mail queued in the same transaction), change a
 * role, remove a member, revoke an invitation, accept one. A workshop always keeps at least one owner.
 */
import { createHash, randomBytes } from 'node:crypto';
import { z } from 'zod';
import type { Db } from '@/db/client';
import { recordAudit } from '@/db/queries/audit';
import { findOpenInvitationByTokenHash, insertInvitation, listOpenInvitations, markInvitationAccepted, revokeInvitation as revokeInvitationRow } from '@/db/queries/invitations';
import * as m from '@/db/queries/memberships';
import { findUserByEmail, insertUser, toPublicUser, type PublicUser } from '@/db/queries/users';
import { getWorkshop } from '@/db/queries/workshops';
import { hashPassword, PasswordSchema } from '@/lib/auth/password';
import { AppError, conflict, notFound } from '@/lib/http/errors';
import { invitationMail, queueMail } from '@/lib/mail';
import { authorize, ROLES, type Actor, type Role } from './actor';
import { EmailSchema } from './auth';

/** How long an invitation link stays valid: 7 days, ms. */
export const INVITATION_TTL_MS = 7 * 24 * 3600 * 1000;

export const InviteSchema = z.object({ email: EmailSchema, role: z.enum(ROLES) });
export const RoleChangeSchema = z.object({ role: z.enum(ROLES) });
export const AcceptSchema = z.object({
  token: z.string().min(20).max(200),
  name: z.string().trim().min(1).max(100).optional(),
  password: PasswordSchema.optional(),
});

export const hashToken = (token: string): string => createHash('sha256').update(token).digest('hex');

export async function listMembers(db: Db, actor: Actor) {
  authorize(actor, 'workshop:read');
  const members = await m.listMembers(db, actor.workshopId);
  const invitations = actor.role === 'owner' ? await listOpenInvitations(db, actor.workshopId) : [];
  return { members, invitations };
}

/** Creates an invitation and returns it with the one-time link `${baseUrl}/invite/${token}`. */
export async function inviteMember(db: Db, actor: Actor, input: z.infer<typeof InviteSchema>, baseUrl: string) {
  authorize(actor, 'members:manage');
  const existing = await findUserByEmail(db, input.email);
  if (existing && (await m.getMembership(db, actor.workshopId, existing.id))) {
    throw conflict('This person is already a member.', { email: 'Already a member.' });
  }
  const token = randomBytes(32).toString('base64url');
  const link = `${baseUrl.replace(/\/$/, '')}/invite/${token}`;
  const expiresAt = Date.now() + INVITATION_TTL_MS;
  const workshop = await getWorkshop(db, actor.workshopId);
  const mail = invitationMail({ workshopName: workshop?.name ?? 'Workshop', inviterName: actor.user.name, role: input.role, acceptUrl: link, expiresAt });
  const invitation = await db.transaction(async (tx) => {
    const row = await insertInvitation(tx, {
      workshopId: actor.workshopId,
      email: input.email,
      role: input.role,
      tokenHash: hashToken(token),
      invitedBy: actor.user.id,
      expiresAt,
    });
    // the invitation mail is written with the invitation: it exists exactly when the invitation does
    await queueMail(tx, input.email, 'invitation', mail, actor.workshopId);
    await recordAudit(tx, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'member.invite', targetType: 'invitation', targetId: row.id, detail: { email: input.email, role: input.role } });
    return row;
  });
  return {
    invitation: { id: invitation.id, email: invitation.email, role: invitation.role, createdAt: invitation.createdAt, expiresAt: invitation.expiresAt },
    link,
  };
}

async function requireMember(db: Db, actor: Actor, userId: string) {
  const row = await m.getMembership(db, actor.workshopId, userId);
  if (!row) throw notFound('member');
  return row;
}

async function assertKeepsAnOwner(db: Db, actor: Actor, current: Role) {
  if (current === 'owner' && (await m.countOwners(db, actor.workshopId)) <= 1) {
    throw conflict('A workshop needs at least one owner; make someone else owner first.');
  }
}

export async function changeRole(db: Db, actor: Actor, userId: string, role: Role) {
  authorize(actor, 'workshop:read');
  const row = await requireMember(db, actor, userId);
  authorize(actor, 'members:manage');
  if (row.role === role) return;
  if (role !== 'owner') await assertKeepsAnOwner(db, actor, row.role);
  await db.transaction(async (tx) => {
    await m.updateMembershipRole(tx, actor.workshopId, userId, role);
    await recordAudit(tx, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'member.role', targetType: 'user', targetId: userId, detail: { from: row.role, to: role } });
  });
}

export async function removeMember(db: Db, actor: Actor, userId: string) {
  authorize(actor, 'workshop:read');
  const row = await requireMember(db, actor, userId);
  authorize(actor, 'members:manage');
  await assertKeepsAnOwner(db, actor, row.role);
  await db.transaction(async (tx) => {
    await m.deleteMembership(tx, actor.workshopId, userId);
    await recordAudit(tx, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'member.remove', targetType: 'user', targetId: userId, detail: { role: row.role } });
  });
}

export async function revokeInvitation(db: Db, actor: Actor, invitationId: string) {
  authorize(actor, 'members:manage');
  if (!(await revokeInvitationRow(db, actor.workshopId, invitationId))) throw notFound('invitation');
  await recordAudit(db, { workshopId: actor.workshopId, actorId: actor.user.id, action: 'member.invite_revoke', targetType: 'invitation', targetId: invitationId });
}

/** What the invitation page shows before accepting (no secret in it). */
export async function describeInvitation(db: Db, token: string) {
  const inv = await findOpenInvitationByTokenHash(db, hashToken(token));
  if (!inv) return null;
  const ws = await getWorkshop(db, inv.workshopId);
  const existing = await findUserByEmail(db, inv.email);
  return { email: inv.email, role: inv.role, workshopName: ws?.name ?? 'a workshop', hasAccount: Boolean(existing) };
}

/**
 * Accepts an invitation. Signed in (`signedIn` given): the invitation's e-mail must be the user's.
 * Signed out: creates the account from `name` and `password` (the e-mail is the invitation's); an existing
 * account must sign in first. Returns the user and the workshop to act in.
 */
export async function acceptInvitation(db: Db, signedIn: PublicUser | null, input: z.infer<typeof AcceptSchema>): Promise<{ user: PublicUser; workshopId: string; created: boolean }> {
  const inv = await findOpenInvitationByTokenHash(db, hashToken(input.token));
  if (!inv) throw new AppError('invitation_invalid', 404, 'This invitation link is not valid any more (used, revoked or expired).');
  let user = signedIn;
  let created = false;
  if (user) {
    if (user.email !== inv.email) throw new AppError('invitation_other_email', 403, `This invitation is for ${inv.email}; sign in with that address.`);
  } else {
    if (await findUserByEmail(db, inv.email)) throw new AppError('sign_in_first', 409, `An account for ${inv.email} exists; sign in first, then open the link again.`);
    if (!input.name || !input.password) {
      throw new AppError('invalid_input', 422, 'Enter your name and a password.', { ...(input.name ? {} : { name: 'Enter your name.' }), ...(input.password ? {} : { password: 'Choose a password.' }) });
    }
    const passwordHash = await hashPassword(input.password);
    user = toPublicUser(await insertUser(db, { email: inv.email, name: input.name, passwordHash }));
    created = true;
  }
  const u = user;
  await db.transaction(async (tx) => {
    if (!(await markInvitationAccepted(tx, inv.id, u.id))) throw new AppError('invitation_invalid', 404, 'This invitation link was used already.');
    if (!(await m.getMembership(tx, inv.workshopId, u.id))) await m.insertMembership(tx, { workshopId: inv.workshopId, userId: u.id, role: inv.role });
    await recordAudit(tx, { workshopId: inv.workshopId, actorId: u.id, action: 'member.join', targetType: 'invitation', targetId: inv.id, detail: { role: inv.role } });
  });
  return { user: u, workshopId: inv.workshopId, created };
}
