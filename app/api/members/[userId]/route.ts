import { z } from 'zod';
import { route } from '@/lib/http/route';
import { changeRole, removeMember, RoleChangeSchema } from '@/lib/services/members';

const Params = z.object({ userId: z.string().min(1).max(64) });

/** PATCH /api/members/{userId} {role} → {ok: true}. Owner only; the last owner keeps the role. */
export const PATCH = route({ params: Params, body: RoleChangeSchema }, async ({ db, actor, params, body }) => {
  await changeRole(db, actor, params.userId, body.role);
  return { ok: true };
});

/** DELETE /api/members/{userId} → {ok: true}. Owner only; the last owner cannot be removed. */
export const DELETE = route({ params: Params }, async ({ db, actor, params }) => {
  await removeMember(db, actor, params.userId);
  return { ok: true };
});
