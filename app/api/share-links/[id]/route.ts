import { z } from 'zod';
import { route } from '@/lib/http/route';
import { revokeShareLink } from '@/lib/services/share';

/** DELETE /api/share-links/{id} → {ok: true}; the link answers 410 from now on. Owner or machinist. */
export const DELETE = route({ params: z.object({ id: z.string().min(1).max(64) }) }, async ({ db, actor, params }) => {
  await revokeShareLink(db, actor, params.id);
  return { ok: true };
});
