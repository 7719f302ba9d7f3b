/**
 * Server-side sessions. The sealed cookie names one row; a session is live while not revoked and not
 * expired (times in ms since the epoch). No cookies are read here.
 */
import { and, eq, gt, isNull } from 'drizzle-orm';
import { sessions } from '@/db/schema';
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

/** The session if it is live at `now`. */
export async function getLiveSession(db: Queryable, id: string, now = Date.now()): Promise<SessionRow | undefined> {
  const [row] = await db
    .select()
    .from(sessions)
    .where(and(eq(sessions.id, id), isNull(sessions.revokedAt), gt(sessions.expiresAt, now)))
    .limit(1);
  return row;
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
