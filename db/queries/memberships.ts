/** Memberships: a user's role in a workshop. */
import { and, asc, eq } from 'drizzle-orm';
import { memberships, users, workshops, type Role } from '@/db/schema';
import type { Queryable } from './types';

export type MembershipRow = typeof memberships.$inferSelect;

export async function getMembership(db: Queryable, workshopId: string, userId: string): Promise<MembershipRow | undefined> {
  const [row] = await db
    .select()
    .from(memberships)
    .where(and(eq(memberships.workshopId, workshopId), eq(memberships.userId, userId)))
    .limit(1);
  return row;
}

/** The user's workshops, oldest membership first. */
export async function listUserWorkshops(db: Queryable, userId: string) {
  return db
    .select({ workshopId: workshops.id, name: workshops.name, demo: workshops.demo, role: memberships.role })
    .from(memberships)
    .innerJoin(workshops, eq(workshops.id, memberships.workshopId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(memberships.createdAt));
}

export async function listMembers(db: Queryable, workshopId: string) {
  return db
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workshopId, workshopId))
    .orderBy(asc(memberships.createdAt));
}

export async function insertMembership(db: Queryable, input: { workshopId: string; userId: string; role: Role }): Promise<void> {
  await db.insert(memberships).values(input);
}

export async function updateMembershipRole(db: Queryable, workshopId: string, userId: string, role: Role): Promise<void> {
  await db.update(memberships).set({ role }).where(and(eq(memberships.workshopId, workshopId), eq(memberships.userId, userId)));
}

export async function deleteMembership(db: Queryable, workshopId: string, userId: string): Promise<void> {
  await db.delete(memberships).where(and(eq(memberships.workshopId, workshopId), eq(memberships.userId, userId)));
}

export async function countOwners(db: Queryable, workshopId: string): Promise<number> {
  const rows = await db
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(and(eq(memberships.workshopId, workshopId), eq(memberships.role, 'owner')));
  return rows.length;
}
