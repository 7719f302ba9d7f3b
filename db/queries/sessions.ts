/**
 * Server-side sessions. The sealed cookie names one row; a session is live while not revoked and not
 * expired (times in ms since the epoch). No cookies are read here.
 */
import { and, asc, eq, gt, isNull } from 'drizzle-orm';
import { memberships, sessions, users, workshops, type Role } from '@/db/schema';
import { newId, type Queryable } from './types';

export type SessionRow = typeof sessions.$inferSelect;

export async function insertSession(
  db: Queryable,
  input: { userId: string; expiresAt: number; ip?: string | null; userAgent?: string | null },
): Promise<SessionRow> {
  const [row] = await db
    .insert(sessions)
    .values({ id: newId(), userId: input.userId, expiresAt: input.expiresAt, ip: input.ip ?? null, userAgent: input.userAgent?.slice(0, 300) ?? null, lastSeenAt: Date.now() })
    .returning();
  if (!row) throw new Error('insertSession returned no row');
  return row;
}

/** A live session with its user and the user's workshops (oldest membership first), read in one query. */
export interface LiveSessionAuth {
  session: Pick<SessionRow, 'id' | 'userId' | 'lastSeenAt' | 'expiresAt'>;
  user: { id: string; email: string; name: string; units: 'mm' | 'in' };
  workshops: { workshopId: string; name: string; role: Role }[];
}

/**
 * The session `id` if it is live at `now`, with its user and every workshop the user belongs to: one query
 * (sessions ⋈ users ⟕ memberships ⟕ workshops) instead of three, since every signed-in request needs all of it.
 */
export async function getLiveSessionAuth(db: Queryable, id: string, now = Date.now()): Promise<LiveSessionAuth | undefined> {
  const rows = await db
    .select({
      sessionId: sessions.id, userId: sessions.userId, lastSeenAt: sessions.lastSeenAt, expiresAt: sessions.expiresAt,
      email: users.email, name: users.name, units: users.units,
      workshopId: workshops.id, workshopName: workshops.name, role: memberships.role,
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .leftJoin(memberships, eq(memberships.userId, sessions.userId))
    .leftJoin(workshops, eq(workshops.id, memberships.workshopId))
    .where(and(eq(sessions.id, id), isNull(sessions.revokedAt), gt(sessions.expiresAt, now)))
    .orderBy(asc(memberships.createdAt));
  const first = rows[0];
  if (!first) return undefined;
  return {
    session: { id: first.sessionId, userId: first.userId, lastSeenAt: first.lastSeenAt, expiresAt: first.expiresAt },
    user: { id: first.userId, email: first.email, name: first.name, units: first.units },
    workshops: rows.flatMap((r) => (r.workshopId && r.workshopName !== null && r.role ? [{ workshopId: r.workshopId, name: r.workshopName, role: r.role }] : [])),
  };
}

export async function touchSession(db: Queryable, id: string, now = Date.now()): Promise<void> {
  await db.update(sessions).set({ lastSeenAt: now }).where(eq(sessions.id, id));
}

export async function revokeSession(db: Queryable, id: string, now = Date.now()): Promise<void> {
  await db.update(sessions).set({ revokedAt: now }).where(and(eq(sessions.id, id), isNull(sessions.revokedAt)));
}

/** Revokes every live session of a user (password change, removal). */
export async function revokeUserSessions(db: Queryable, userId: string, now = Date.now()): Promise<void> {
  await db.update(sessions).set({ revokedAt: now }).where(and(eq(sessions.userId, userId), isNull(sessions.revokedAt)));
}
