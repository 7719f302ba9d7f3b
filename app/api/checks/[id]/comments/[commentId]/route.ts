import { z } from 'zod';
import { route } from '@/lib/http/route';
import { deleteComment } from '@/lib/services/comments';

/** DELETE /api/checks/{id}/comments/{commentId} → {ok: true}. The author or an owner. */
export const DELETE = route({ params: z.object({ id: z.string().min(1).max(64), commentId: z.string().min(1).max(64) }) }, async ({ db, actor, params }) => {
  await deleteComment(db, actor, params.commentId);
  return { ok: true };
});
