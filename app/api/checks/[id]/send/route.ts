import { z } from 'zod';
import { publicBaseUrl } from '@/lib/http/origin';
import { json, route } from '@/lib/http/route';
import { sendReportToHelper, ShareSendSchema } from '@/lib/services/share';

const Params = z.object({ id: z.string().min(1).max(64) });

/**
 * POST /api/checks/{id}/send {email, note?, expiresInDays?} → 201 {link, sentTo}: a share link and the report
 * mail (verdict, note, deviation map, link) to a helper, written in one transaction. Owner or machinist.
 */
export const POST = route({ params: Params, body: ShareSendSchema }, async ({ db, actor, params, body, req }) =>
  json(await sendReportToHelper(db, actor, params.id, body, publicBaseUrl(req)), 201),
);
