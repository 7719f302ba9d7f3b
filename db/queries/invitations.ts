/** Invitations to a workshop. Only the SHA-256 of the token is stored; the link is shown once. */
import { and, desc, eq, gt, isNull } from 'drizzle-orm';
import { invitations, type Role } from '@/db/schema';
import { newId, type Queryable } from './types';

export type InvitationRow = typeof invitations.$inferSelect;

export async function insertInvitation(
  db: Queryable,
  input: { workshopId: string; email: string; role: Role; tokenHash: string; invitedBy: string; expiresAt: number },
): Promise<InvitationRow> {
  const [row] = await db.insert(invitations).values({ id: newId(), ...input }).returning();
  if (!row) throw new Error('insertInvitation returned no row');
  return row;
}

/** An invitation that is neither accepted, revoked nor expired at `now`. */
export async function findOpenInvitationByTokenHash(db: Queryable, tokenHash: string, now = Date.now()): Promise<InvitationRow | undefined> {
  const [row] = await db
    .select()
    .from(invitations)
    .where(and(eq(invitations.tokenHash, tokenHash), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, now)))
    .limit(1);
  return row;
}

export async function listOpenInvitations(db: Queryable, workshopId: string, now = Date.now()) {
  return db
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, createdAt: invitations.createdAt, expiresAt: invitations.expiresAt })
    .from(invitations)
    .where(and(eq(invitations.workshopId, workshopId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, now)))
    .orderBy(desc(invitations.createdAt));
}

export async function revokeInvitation(db: Queryable, workshopId: string, id: string, now = Date.now()): Promise<boolean> {
  const rows = await db
    .update(invitations)
    .set({ revokedAt: now })
    .where(and(eq(invitations.workshopId, workshopId), eq(invitations.id, id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
    .returning({ id: invitations.id });
  return rows.length > 0;
}

/** Marks an open invitation accepted; false when someone else used it first. */
export async function markInvitationAccepted(db: Queryable, id: string, userId: string, now = Date.now()): Promise<boolean> {
  const rows = await db
    .update(invitations)
    .set({ acceptedAt: now, acceptedBy: userId })
    .where(and(eq(invitations.id, id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
    .returning({ id: invitations.id });
  return rows.length > 0;
}
