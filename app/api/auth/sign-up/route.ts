import { startSession, withSessionCookie } from '@/lib/auth/session';
import { json, route } from '@/lib/http/route';
import { signUp, SignUpSchema } from '@/lib/services/auth';

/** POST /api/auth/sign-up {email, password, name, workshopName} → 201 {user, workshopId} and the session cookie. */
export const POST = route({ auth: 'none', body: SignUpSchema }, async ({ db, body, req, ip }) => {
  const { user, workshopId } = await signUp(db, body, { ip });
  const sealed = await startSession(db, { userId: user.id, workshopId, ip, userAgent: req.headers.get('user-agent') });
  return withSessionCookie(json({ user, workshopId }, 201), sealed, req);
});
