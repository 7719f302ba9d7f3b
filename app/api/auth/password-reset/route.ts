import { publicBaseUrl } from '@/lib/http/origin';
import { json, route } from '@/lib/http/route';
import { requestPasswordReset, ResetRequestSchema } from '@/lib/services/password-reset';

/** POST /api/auth/password-reset {email} → 202 {ok: true} whether or not the address has an account. */
export const POST = route({ auth: 'none', body: ResetRequestSchema }, async ({ db, body, req, ip }) => {
  await requestPasswordReset(db, body, publicBaseUrl(req), { ip });
  return json({ ok: true }, 202);
});
