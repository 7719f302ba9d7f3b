import { readCookie, sealSession, SESSION_COOKIE, startSession, unsealSession, withSessionCookie } from '@/lib/auth/session';
import { json, route } from '@/lib/http/route';
import { AcceptSchema, acceptInvitation } from '@/lib/services/members';

/**
 * POST /api/invitations/accept {token, name?, password?} → 200 {workshopId}. Signed in: joins with the
 * current account (same e-mail). Signed out: creates the account and signs it in.
 */
export const POST = route({ auth: 'none', body: AcceptSchema }, async ({ db, auth, body, req, ip }) => {
  const { user, workshopId, created } = await acceptInvitation(db, auth?.user ?? null, body);
  const current = auth ? await unsealSession(readCookie(req.headers.get('cookie'), SESSION_COOKIE)) : null;
  const sealed = current
    ? await sealSession({ sid: current.sid, wid: workshopId })
    : await startSession(db, { userId: user.id, workshopId, ip, userAgent: req.headers.get('user-agent') });
  return withSessionCookie(json({ user, workshopId, created }), sealed, req);
});
