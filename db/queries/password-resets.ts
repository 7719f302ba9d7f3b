/**
 * Password reset tokens (only their SHA-256, hex, is stored) and the password change they allow. A token is
 * live while unused and before `expiresAt` (ms since the Unix epoch). No cookies here.
 */
import { and, eq, gt, isNull } from 'drizzle-orm';
import { passwordResets, users } from '@/db/schema';
import { newId, type Queryable } from './types';

export type PasswordResetRow = typeof passwordResets.$inferSelect;

export async function insertPasswordReset(db: Queryable, input: { userId: string; tokenHash: string; expiresAt: number }): Promise<PasswordResetRow> {
  const [row] = await db.insert(passwordResets).values({ id: newId(), ...input }).returning();
  if (!row) throw new Error('insertPasswordReset returned no row');
  return row;
}

export async function findLivePasswordReset(db: Queryable, tokenHash: string, now = Date.now()): Promise<PasswordResetRow | undefined> {
  const [row] = await db
    .select()
    .from(passwordResets)
    .where(and(eq(passwordResets.tokenHash, tokenHash), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, now)))
    .limit(1);
  return row;
}

/** Marks the token used; false when it was used already (two tabs, a replay). */
export async function markPasswordResetUsed(db: Queryable, id: string, now = Date.now()): Promise<boolean> {
  const rows = await db
    .update(passwordResets)
    .set({ usedAt: now })
    .where(and(eq(passwordResets.id, id), isNull(passwordResets.usedAt)))
    .returning({ id: passwordResets.id });
  return rows.length > 0;
}

/** Every other open token of the user stops working once one is used. */
export async function expireUserPasswordResets(db: Queryable, userId: string, now = Date.now()): Promise<void> {
  await db.update(passwordResets).set({ usedAt: now }).where(and(eq(passwordResets.userId, userId), isNull(passwordResets.usedAt)));
}

export async function setUserPassword(db: Queryable, userId: string, passwordHash: string, now = Date.now()): Promise<void> {
  await db.update(users).set({ passwordHash, passwordChangedAt: now }).where(eq(users.id, userId));
}
