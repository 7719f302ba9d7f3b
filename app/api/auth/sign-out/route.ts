import { endSession, readCookie, SESSION_COOKIE, unsealSession, withSessionCookie } from '@/lib/auth/session';
import { json, route } from '@/lib/http/route';

/** POST /api/auth/sign-out → 200; revokes the server-side session and clears the cookie. */
export const POST = route({ auth: 'none' }, async ({ db, req }) => {
  await endSession(db, await unsealSession(readCookie(req.headers.get('cookie'), SESSION_COOKIE)));
  return withSessionCookie(json({ ok: true }), null, req);
});
