import { z } from 'zod';
import { route } from '@/lib/http/route';
import { revokeInvitation } from '@/lib/services/members';

/** DELETE /api/invitations/{id} → {ok: true}; the link stops working. Owner only. */
export const DELETE = route({ params: z.object({ id: z.string().min(1).max(64) }) }, async ({ db, actor, params }) => {
  await revokeInvitation(db, actor, params.id);
  return { ok: true };
});
