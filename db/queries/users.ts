/** Users. E-mail addresses are stored trimmed and lower-cased. No cookies here. */
import { eq } from 'drizzle-orm';
import { users } from '@/db/schema';
import { newId, type Queryable } from './types';

export type UserRow = typeof users.$inferSelect;
/** A user without the password hash: what leaves the data layer for display. */
export type PublicUser = Pick<UserRow, 'id' | 'email' | 'name' | 'units'>;

export const normaliseEmail = (email: string): string => email.trim().toLowerCase();

export function toPublicUser(u: UserRow): PublicUser {
  return { id: u.id, email: u.email, name: u.name, units: u.units };
}

export async function findUserByEmail(db: Queryable, email: string): Promise<UserRow | undefined> {
  const [row] = await db.select().from(users).where(eq(users.email, normaliseEmail(email))).limit(1);
  return row;
}

export async function getUserById(db: Queryable, id: string): Promise<UserRow | undefined> {
  const [row] = await db.select().from(users).where(eq(users.id, id)).limit(1);
  return row;
}

export async function insertUser(db: Queryable, input: { email: string; name: string; passwordHash: string }): Promise<UserRow> {
  const [row] = await db
    .insert(users)
    .values({ id: newId(), email: normaliseEmail(input.email), name: input.name.trim(), passwordHash: input.passwordHash })
    .returning();
  if (!row) throw new Error('insertUser returned no row');
  return row;
}
