import { z } from 'zod';
import { json, route } from '@/lib/http/route';
import { addComment, CommentCreateSchema, listCheckComments } from '@/lib/services/comments';

const Params = z.object({ id: z.string().min(1).max(64) });

/** GET /api/checks/{id}/comments → {comments}, oldest first. */
export const GET = route({ params: Params }, async ({ db, actor, params }) => ({ comments: await listCheckComments(db, actor, params.id) }));

/** POST /api/checks/{id}/comments {body, positionLabel?} → 201 {comment}. Any member (reviewers too). */
export const POST = route({ params: Params, body: CommentCreateSchema }, async ({ db, actor, params, body }) =>
  json({ comment: await addComment(db, actor, params.id, body) }, 201),
);
