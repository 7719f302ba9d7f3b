import { json, route } from '@/lib/http/route';
import { resetPassword, ResetSchema } from '@/lib/services/password-reset';

/** POST /api/auth/password-reset/confirm {token, password} → {ok: true}; every session of the user ends. */
export const POST = route({ auth: 'none', body: ResetSchema }, async ({ db, body, ip }) => {
  await resetPassword(db, body, { ip });
  return json({ ok: true });
});
