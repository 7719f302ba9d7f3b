import { z } from 'zod';
import { route } from '@/lib/http/route';
import { openSharedReport, sharedReportViewJson } from '@/lib/services/share';

/**
 * GET /api/shared/{token} → the shared view as JSON {bedName, checkTitle, checkedAt, expiresAt, comments,
 * report}; no account needed. Each answer counts a view: the shared page loads its map and tables from here.
 * `/s/{token}` with `Accept: application/json` is rewritten here (next.config.mjs). 404 for an unknown or
 * tampered token, 410 for a revoked or expired one.
 */
export const GET = route({ auth: 'none', params: z.object({ token: z.string().max(200) }) }, async ({ db, params }) => {
  const view = await openSharedReport(db, params.token, { countView: true });
  return new Response(sharedReportViewJson(view), {
    headers: { 'content-type': 'application/json', 'cache-control': 'no-store', vary: 'Accept', 'referrer-policy': 'no-referrer', 'x-robots-tag': 'noindex' },
  });
});
