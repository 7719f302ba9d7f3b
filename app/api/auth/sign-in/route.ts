import { startSession, withSessionCookie } from '@/lib/auth/session';
import { json, route } from '@/lib/http/route';
import { signIn, SignInSchema } from '@/lib/services/auth';

/** POST /api/auth/sign-in {email, password} → 200 {user, workshopId} and the session cookie; 401 on bad credentials. */
export const POST = route({ auth: 'none', body: SignInSchema }, async ({ db, body, req, ip }) => {
  const { user, workshopId } = await signIn(db, body, { ip });
  const sealed = await startSession(db, { userId: user.id, workshopId, ip, userAgent: req.headers.get('user-agent') });
  return withSessionCookie(json({ user, workshopId }), sealed);
});
