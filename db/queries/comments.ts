/** Comments on a check, or on one position of it (`dog B3`). Scoped by workshop; no cookies here. */
import { and, asc, eq } from 'drizzle-orm';
import { comments, users } from '@/db/schema';
import { newId, type Queryable } from './types';

export type CommentRow = typeof comments.$inferSelect;
export type CommentView = { id: string; checkId: string; authorId: string | null; authorName: string | null; positionLabel: string | null; body: string; createdAt: number };

export async function insertComment(
  db: Queryable,
  input: { workshopId: string; checkId: string; authorId: string; positionLabel: string | null; body: string },
): Promise<CommentRow> {
  const [row] = await db.insert(comments).values({ id: newId(), ...input }).returning();
  if (!row) throw new Error('insertComment returned no row');
  return row;
}

/** A check's comments, oldest first, with the author's display name (null once the author is deleted). */
export async function listComments(db: Queryable, workshopId: string, checkId: string): Promise<CommentView[]> {
  return db
    .select({
      id: comments.id,
      checkId: comments.checkId,
      authorId: comments.authorId,
      authorName: users.name,
      positionLabel: comments.positionLabel,
      body: comments.body,
      createdAt: comments.createdAt,
    })
    .from(comments)
    .leftJoin(users, eq(users.id, comments.authorId))
    .where(and(eq(comments.workshopId, workshopId), eq(comments.checkId, checkId)))
    .orderBy(asc(comments.createdAt), asc(comments.id));
}

export async function getComment(db: Queryable, workshopId: string, id: string): Promise<CommentRow | undefined> {
  const [row] = await db.select().from(comments).where(and(eq(comments.workshopId, workshopId), eq(comments.id, id))).limit(1);
  return row;
}

export async function deleteComment(db: Queryable, workshopId: string, id: string): Promise<boolean> {
  const rows = await db.delete(comments).where(and(eq(comments.workshopId, workshopId), eq(comments.id, id))).returning({ id: comments.id });
  return rows.length > 0;
}
