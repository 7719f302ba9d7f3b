import { readCookie, SESSION_COOKIE, startSession, unsealSession, withSessionCookie } from '@/lib/auth/session';
import { json, route } from '@/lib/http/route';
import { changePassword, PasswordChangeSchema } from '@/lib/security/password-change';

/**
 * POST /api/me/password {currentPassword, newPassword} → 200 {ok: true} with a new session cookie. Every
 * other session of the user (other devices, copied cookies) ends.
 */
export const POST = route({ auth: 'user', body: PasswordChangeSchema }, async ({ db, auth, body, req, ip }) => {
  await changePassword(db, auth.user, body, { ip });
  const wid = (await unsealSession(readCookie(req.headers.get('cookie'), SESSION_COOKIE)))?.wid ?? auth.actor?.workshopId ?? null;
  const sealed = await startSession(db, { userId: auth.user.id, workshopId: wid, ip, userAgent: req.headers.get('user-agent') });
  return withSessionCookie(json({ ok: true }), sealed, req);
});
