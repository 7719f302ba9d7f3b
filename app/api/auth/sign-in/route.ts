import { endSession, readCookie, SESSION_COOKIE, startSession, unsealSession, withSessionCookie } from '@/lib/auth/session';
import { json, route } from '@/lib/http/route';
import { signIn, SignInSchema } from '@/lib/services/auth';

/** POST /api/auth/sign-in {email, password} → 200 {user, workshopId} and the session cookie; 401 on bad credentials. */
export const POST = route({ auth: 'none', body: SignInSchema }, async ({ db, body, req, ip }) => {
  const { user, workshopId } = await signIn(db, body, { ip });
  // a new session at every sign-in (no fixation); the one the browser held before, if any, ends
  await endSession(db, await unsealSession(readCookie(req.headers.get('cookie'), SESSION_COOKIE)));
  const sealed = await startSession(db, { userId: user.id, workshopId, ip, userAgent: req.headers.get('user-agent') });
  return withSessionCookie(json({ user, workshopId }), sealed, req);
});
