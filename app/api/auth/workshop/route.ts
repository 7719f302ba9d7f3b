import { z } from 'zod';
import { getMembership } from '@/db/queries/memberships';
import { readCookie, sealSession, SESSION_COOKIE, unsealSession, withSessionCookie } from '@/lib/auth/session';
import { notFound } from '@/lib/http/errors';
import { json, route } from '@/lib/http/route';

/** POST /api/auth/workshop {workshopId} → 200; acts in another workshop the user belongs to (404 if not a member). */
export const POST = route({ auth: 'user', body: z.object({ workshopId: z.string().min(1) }) }, async ({ db, auth, body, req }) => {
  const membership = await getMembership(db, body.workshopId, auth.user.id);
  if (!membership) throw notFound('workshop');
  const data = await unsealSession(readCookie(req.headers.get('cookie'), SESSION_COOKIE));
  if (!data) throw notFound('session');
  return withSessionCookie(json({ workshopId: membership.workshopId, role: membership.role }), await sealSession({ sid: data.sid, wid: membership.workshopId }), req);
});
