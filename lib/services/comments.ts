/**
 * Comments on a check or on one of its positions (`dog B3 binds when hot`). Anyone of the workshop may
 * comment (reviewers included); the author or an owner may delete. A position is named by its report label
 * (`dog B3`), or by its cell (`B3`) when only one family has that cell.
 */
import { z } from 'zod';
import type { Db } from '@/db/client';
import { getCheck } from '@/db/queries/checks';
import * as q from '@/db/queries/comments';
import { ReportSchema } from '@/lib/geometry/contract';
import { forbidden, invalidInput, notFound } from '@/lib/http/errors';
import { authorize, type Actor } from './actor';

export const CommentCreateSchema = z.object({
  body: z.string().trim().min(1, 'Write something.').max(2000),
  positionLabel: z.string().trim().max(60).nullish().transform((v) => (v ? v : null)),
});

/** The report label a comment's position names, or throws 422. */
function canonicalLabel(reportJson: string | null, label: string): string {
  if (!reportJson) return label;
  const labels = ReportSchema.parse(JSON.parse(reportJson)).positions.map((p) => p.label);
  const exact = labels.find((l) => l.toLowerCase() === label.toLowerCase());
  if (exact) return exact;
  const cell = label.toUpperCase();
  const byCell = labels.filter((l) => l.split(' ').pop() === cell);
  if (byCell.length === 1) return byCell[0]!;
  const message = byCell.length > 1 ? `Several families have ${cell}: say which (${byCell.join(', ')}).` : `This bed has no position ${label}.`;
  throw invalidInput(message, { positionLabel: message });
}

export async function listCheckComments(db: Db, actor: Actor, checkId: string): Promise<q.CommentView[]> {
  authorize(actor, 'workshop:read');
  if (!(await getCheck(db, actor.workshopId, checkId))) throw notFound('check');
  return q.listComments(db, actor.workshopId, checkId);
}

export async function addComment(db: Db, actor: Actor, checkId: string, input: z.infer<typeof CommentCreateSchema>): Promise<q.CommentView> {
  authorize(actor, 'workshop:read');
  const check = await getCheck(db, actor.workshopId, checkId);
  if (!check) throw notFound('check');
  authorize(actor, 'comment:write');
  const positionLabel = input.positionLabel ? canonicalLabel(check.reportJson, input.positionLabel) : null;
  const row = await q.insertComment(db, { workshopId: actor.workshopId, checkId, authorId: actor.user.id, positionLabel, body: input.body });
  return { id: row.id, checkId, authorId: actor.user.id, authorName: actor.user.name, positionLabel, body: row.body, createdAt: row.createdAt };
}

export async function deleteComment(db: Db, actor: Actor, commentId: string): Promise<void> {
  authorize(actor, 'workshop:read');
  const row = await q.getComment(db, actor.workshopId, commentId);
  if (!row) throw notFound('comment');
  if (row.authorId !== actor.user.id && actor.role !== 'owner') throw forbidden('Only the author or an owner may delete a comment.');
  await q.deleteComment(db, actor.workshopId, commentId);
}
