import { z } from 'zod';
import { json, route } from '@/lib/http/route';
import { openSharedReport } from '@/lib/services/share';

/**
 * GET /api/shared/{token} → the shared view as JSON {bedName, checkTitle, checkedAt, expiresAt, report,
 * comments}; no account needed. `/s/{token}` with `Accept: application/json` is rewritten here
 * (next.config.mjs). 404 for an unknown or tampered token, 410 for a revoked or expired one.
 */
export const GET = route({ auth: 'none', params: z.object({ token: z.string().max(200) }) }, async ({ db, params }) => {
  const view = await openSharedReport(db, params.token, { countView: true });
  return json(view, 200, { vary: 'Accept', 'referrer-policy': 'no-referrer', 'x-robots-tag': 'noindex' });
});
